// The test database (real PostgreSQL, started by `npm test`).
import { createDb } from "~/db/db.server";

export const testDatabaseUrl = process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54339/tilldawn_test";

export function openTestDb() {
  return createDb(testDatabaseUrl, 4);
}
