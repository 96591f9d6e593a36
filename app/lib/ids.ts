import { z } from "zod";

const uuid = z.uuid();

/** True for a well-formed id; anything else can never name a row (answer 404, not 500). */
export function isUuid(value: string | undefined): value is string {
  return uuid.safeParse(value).success;
}
