/**
 * Storing and deleting photos: the one path used by the API and the demo seed.
 *
 * Store: the picture is processed in memory (it was read whole, with the byte limit), both
 * objects are put, then the row is inserted in a transaction that checks the target belongs to
 * the rig. If anything after the first put fails, the objects are deleted again before the
 * error goes on; if the process dies in between, the orphan sweep removes them later.
 * Delete: the row first (so nobody sees a photo whose picture is gone), then the objects.
 */
import type { Db } from "~/db/db.server";
import { deletePhotoRow, insertPhoto, toPhotoView, type PhotoTarget, type PhotoView } from "~/repos/photos.server";
import { photoKeys, type PhotoStore } from "~/storage/photo-store.server";
import { processPhoto } from "./process.server";

/** At most this many pictures are decoded at once (each can take 100+ MB while sharp works). */
const PROCESSING_SLOTS = 2;
let busy = 0;
const waiting: Array<() => void> = [];

async function inSlot<T>(work: () => Promise<T>): Promise<T> {
  // A finished picture hands its slot straight to the next one waiting.
  if (busy >= PROCESSING_SLOTS) await new Promise<void>((resolve) => waiting.push(resolve));
  else busy += 1;
  try {
    return await work();
  } finally {
    const next = waiting.shift();
    if (next) next();
    else busy -= 1;
  }
}

export async function storePhoto(
  db: Db,
  store: PhotoStore,
  input: { rigId: string; authorId: string | null; target: PhotoTarget; caption: string; keepLocation: boolean; bytes: Uint8Array },
): Promise<PhotoView> {
  const processed = await inSlot(() => processPhoto(input.bytes, { keepLocation: input.keepLocation }));
  const id = crypto.randomUUID();
  const keys = photoKeys(input.rigId, id, processed.ext);
  try {
    await store.put(keys.original, processed.original, processed.mime);
    await store.put(keys.thumb, processed.thumb, "image/webp");
    const row = await insertPhoto(db, {
      id,
      rigId: input.rigId,
      target: input.target,
      caption: input.caption,
      mime: processed.mime,
      bytes: processed.original.byteLength,
      width: processed.width,
      height: processed.height,
      objectKey: keys.original,
      thumbKey: keys.thumb,
      keptLocation: input.keepLocation,
      authorId: input.authorId,
    });
    return toPhotoView(row);
  } catch (error) {
    await store.delete([keys.original, keys.thumb]).catch((cleanupError: Error) => {
      console.error(`[photos] could not remove the objects of a failed upload (the sweep will): ${cleanupError.message}`);
    });
    throw error;
  }
}

/** Deletes a photo's row and then its objects. False when the rig has no such photo. */
export async function removePhoto(db: Db, store: PhotoStore, rigId: string, photoId: string): Promise<boolean> {
  const row = await deletePhotoRow(db, rigId, photoId);
  if (!row) return false;
  await store.delete([row.objectKey, row.thumbKey]).catch((error: Error) => {
    console.error(`[photos] photo ${photoId} deleted, but its objects stay until the sweep: ${error.message}`);
  });
  return true;
}
