import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { getEnv } from "~/env.server";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;

export function createDb(url: string, max = 10): { db: Db; pool: pg.Pool } {
  const pool = new pg.Pool({ connectionString: url, max, connectionTimeoutMillis: 3000 });
  // An idle client losing its connection must not crash the server.
  pool.on("error", (error) => console.error(`[db] idle client error: ${error.message}`));
  return { db: drizzle(pool, { schema }), pool };
}

const globalForDb = globalThis as unknown as { __tilldawnDb?: { db: Db; pool: pg.Pool } };

/** One memoised pool per process. */
export function getDb(): Db {
  if (!globalForDb.__tilldawnDb) {
    const env = getEnv();
    globalForDb.__tilldawnDb = createDb(env.DATABASE_URL, env.DATABASE_POOL_MAX);
  }
  return globalForDb.__tilldawnDb.db;
}
