// Applies the committed drizzle/ migrations. drizzle-kit's own migrate can exit without a
// message on errors; the migrator prints them.
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { createDb } from "../app/db/db.server";
import { getEnv } from "../app/env.server";

const { db, pool } = createDb(getEnv().DATABASE_URL, 1);
try {
  await migrate(db, { migrationsFolder: new URL("../drizzle", import.meta.url).pathname });
  console.log("[tilldawn] Database migrated");
} catch (error) {
  console.error(`[tilldawn] Migration failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
