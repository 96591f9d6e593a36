/**
 * The photos API's query shapes (app/routes/api.rigs.photos.ts): the list filter and an upload's
 * target, and what an upload's query means (its target, whether to keep the location).
 */
import { z } from "zod";
import { CAPTION_MAX, PLACE_MAX } from "~/photos/limits";
import type { PhotoTarget } from "~/repos/photos.server";

const partId = z.string().trim().min(1).max(100);

export const photoListQuery = z.object({
  partId: partId.optional(),
  place: z.string().trim().min(1).max(PLACE_MAX).optional(),
  readingId: z.uuid().optional(),
});

export const photoUploadQuery = z
  .object({
    partId: partId.optional(),
    place: z.string().trim().max(PLACE_MAX).optional(),
    readingId: z.uuid().optional(),
    caption: z.string().trim().max(CAPTION_MAX).default(""),
    keepLocation: z.enum(["0", "1", "true", "false"]).optional(),
  })
  .refine((q) => !(q.readingId && (q.partId || q.place)), { message: "A photo goes on a reading or on a part, not both.", path: ["readingId"] })
  .refine((q) => Boolean(q.readingId || q.partId || q.place), { message: "Say what the photo shows: partId, place or readingId.", path: ["partId"] });

/** The part, place or reading an upload goes on. */
export function uploadTargetOf(q: z.infer<typeof photoUploadQuery>): PhotoTarget {
  return q.readingId ? { kind: "reading", readingId: q.readingId } : { kind: "part", partId: q.partId ?? null, place: q.place ?? "" };
}

export function keepsLocation(q: z.infer<typeof photoUploadQuery>): boolean {
  return q.keepLocation === "1" || q.keepLocation === "true";
}
