import { sql } from "drizzle-orm";
import { getDb } from "~/db/db.server";

/** GET /api/health — the app and its database; 503 while the database cannot be reached. */
export async function loader() {
  const started = performance.now();
  try {
    await getDb().execute(sql`select 1`);
    return Response.json(
      { status: "ok", database: { status: "up", latencyMs: Math.round(performance.now() - started) } },
      { headers: { "cache-control": "no-store" } },
    );
  } catch (error) {
    return Response.json(
      { status: "degraded", database: { status: "down", message: (error as Error).message } },
      { status: 503, headers: { "cache-control": "no-store" } },
    );
  }
}
