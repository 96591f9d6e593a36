// npm run photos:sweep — removes photo objects that no photo row owns (older than an hour).
// `npm start` runs it once at start; the server also sweeps hourly. See app/photos/cleanup.server.ts.
import { createDb } from "../app/db/db.server";
import { getEnv } from "../app/env.server";
import { sweepOrphanPhotos } from "../app/photos/cleanup.server";
import { getPhotoStore } from "../app/storage/photo-store.server";

const store = getPhotoStore();
if (!store) {
  console.log("[tilldawn] Photo sweep: photos are not set up; nothing to do");
} else {
  const { db, pool } = createDb(getEnv().DATABASE_URL, 1);
  try {
    const result = await sweepOrphanPhotos(db, store);
    console.log(`[tilldawn] Photo sweep: ${result.checked} object(s) checked, ${result.removed.length} orphan(s) removed`);
  } catch (error) {
    console.error(`[tilldawn] Photo sweep failed: ${(error as Error).message}`);
    process.exitCode = 1;
  } finally {
    await pool.end();
  }
}
