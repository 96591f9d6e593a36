import { eq } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "~/db/db.server";
import { CLOCKS } from "~/lib/datetime";
import { userPreferences, users } from "~/db/schema";

export const nameSchema = z
  .string({ error: "Enter your name." })
  .trim()
  .min(1, "Enter the name your crew knows you by.")
  .max(80, "Keep the name under 80 characters.");

export const preferencesSchema = z.object({
  lengthUnit: z.enum(["metric", "imperial"], { error: "Choose metric or imperial." }),
  cableUnit: z.enum(["awg", "mm2"], { error: "Choose AWG or mm²." }),
  temperatureUnit: z.enum(["c", "f"], { error: "Choose °C or °F." }),
  nightDefault: z.boolean(),
  clock: z.enum(CLOCKS, { error: "Choose a 24-hour or a 12-hour clock." }),
});
export type Preferences = z.infer<typeof preferencesSchema>;

export async function setName(db: Db, userId: string, name: string) {
  await db.update(users).set({ name }).where(eq(users.id, userId));
}

export async function savePreferences(db: Db, userId: string, prefs: Preferences) {
  await db
    .insert(userPreferences)
    .values({ userId, ...prefs })
    .onConflictDoUpdate({ target: userPreferences.userId, set: { ...prefs, updatedAt: new Date() } });
}
