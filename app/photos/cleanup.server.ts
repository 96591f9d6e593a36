/**
 * The orphan sweep: removes every object in the photo store that no photo row owns and that is
 * older than the grace period (an upload in progress puts its objects a moment before its row
 * commits, so fresh objects are left alone). Orphans come from a process that died between put
 * and insert, an object delete that failed after its row was deleted, or a rig deleted with
 * its photos (rows cascade; objects do not). Run by `npm run photos:sweep`, at `npm start`,
 * and hourly inside the server (startPhotoSweeper).
 */
import type { Db } from "~/db/db.server";
import { existingPhotoIds } from "~/repos/photos.server";
import { PHOTO_PREFIX, photoIdOfKey, type PhotoStore, type StoredObject } from "~/storage/photo-store.server";

export const SWEEP_GRACE_MS = 60 * 60 * 1000;

export type SweepResult = { checked: number; removed: string[] };

export async function sweepOrphanPhotos(
  db: Db,
  store: PhotoStore,
  options: { graceMs?: number; now?: Date } = {},
): Promise<SweepResult> {
  const cutoff = (options.now ?? new Date()).getTime() - (options.graceMs ?? SWEEP_GRACE_MS);
  const removed: string[] = [];
  let checked = 0;
  let batch: StoredObject[] = [];
  const flush = async () => {
    const ids = [...new Set(batch.map((o) => photoIdOfKey(o.key)).filter((id): id is string => id !== null))];
    const owned = await existingPhotoIds(db, ids);
    const orphans = batch
      .filter((o) => o.lastModified.getTime() <= cutoff)
      .filter((o) => {
        const id = photoIdOfKey(o.key);
        return id === null || !owned.has(id);
      })
      .map((o) => o.key);
    if (orphans.length) {
      await store.delete(orphans);
      removed.push(...orphans);
    }
    batch = [];
  };
  for await (const object of store.list(PHOTO_PREFIX)) {
    checked += 1;
    batch.push(object);
    if (batch.length >= 500) await flush();
  }
  await flush();
  return { checked, removed };
}

const globalSweeper = globalThis as unknown as { __tilldawnPhotoSweeper?: NodeJS.Timeout };

/** Starts the hourly sweep once per process (idempotent; the timer does not keep it alive). */
export function startPhotoSweeper(db: Db, store: PhotoStore, everyMs = SWEEP_GRACE_MS): void {
  if (globalSweeper.__tilldawnPhotoSweeper) return;
  const run = () =>
    sweepOrphanPhotos(db, store)
      .then((r) => r.removed.length && console.log(`[photos] sweep removed ${r.removed.length} orphan object(s)`))
      .catch((error: Error) => console.error(`[photos] sweep failed: ${error.message}`));
  globalSweeper.__tilldawnPhotoSweeper = setInterval(run, everyMs);
  globalSweeper.__tilldawnPhotoSweeper.unref();
}
