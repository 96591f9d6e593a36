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
    // The cause goes to the server's log, never to the caller (it can carry SQL and addresses).
    console.error("[health] database check failed:", (error as Error).message);
    return Response.json(
      { status: "degraded", database: { status: "down" } },
      { status: 503, headers: { "cache-control": "no-store" } },
    );
  }
}
