import type { Route } from "./+types/api.rigs.$rigId.readings.csv";
import Papa from "papaparse";
import { requireRigRole } from "~/auth/guards.server";
import { getDb } from "~/db/db.server";
import { z } from "zod";
import { apiError, issuesOf } from "~/lib/http";
import { walkReadings } from "~/repos/readings.server";

/** A date (2025-10-01) or a time with its offset, 1970 to 2200. */
const dateOrTime = (what: string) =>
  z
    .union([z.iso.date(), z.iso.datetime({ offset: true })], { error: `Give ${what} as an ISO date, e.g. 2025-10-01` })
    .refine((s) => {
      const t = Date.parse(s);
      return t >= 0 && t <= Date.UTC(2200, 0, 1);
    }, `${what} is outside 1970–2200`);
const rangeSchema = z.object({ from: dateOrTime("from").optional(), to: dateOrTime("to").optional() });

const CSV_COLUMNS = ["taken_at", "bank_voltage_v", "current_a", "soc_pct", "temperature_c", "solar_wh_today", "note", "source", "id"];

/** A note starting with = + - @ could run as a formula in a spreadsheet: quote it as text. */
const safeNote = (note: string) => (/^[=+\-@\t\r]/.test(note) ? `'${note}` : note);

/**
 * GET /api/rigs/:rigId/readings.csv[?from&to] — the logbook as CSV, streamed page by page
 * (the server never holds the whole logbook in memory). Times are ISO 8601 in UTC.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const db = getDb();
  const access = await requireRigRole(request, params.rigId, "guest", db);
  // Checked before the stream starts: once the 200 is sent, an error can only cut the file.
  const parsed = rangeSchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) return apiError(400, "invalid_range", "Give from and to as ISO dates, e.g. 2025-10-01.", issuesOf(parsed.error));
  const range = { from: parsed.data.from ? new Date(parsed.data.from) : undefined, to: parsed.data.to ? new Date(parsed.data.to) : undefined };
  const pages = walkReadings(db, access.rig.id, range);
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(encoder.encode(`${CSV_COLUMNS.join(",")}\r\n`));
    },
    async pull(controller) {
      const next = await pages.next();
      if (next.done) return controller.close();
      const rows = next.value.map((r) => [
        r.takenAt.toISOString(),
        r.bankVoltageV ?? "",
        r.currentA ?? "",
        r.socPct ?? "",
        r.temperatureC ?? "",
        r.solarWhToday ?? "",
        safeNote(r.note),
        r.source,
        r.id,
      ]);
      controller.enqueue(encoder.encode(`${Papa.unparse(rows, { newline: "\r\n" })}\r\n`));
    },
    async cancel() {
      await pages.return(undefined);
    },
  });
  const name = `${access.rig.name.replace(/[^\w-]+/g, "-").toLowerCase() || "rig"}-logbook.csv`;
  return new Response(stream, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${name}"`,
      "cache-control": "private, no-store",
    },
  });
}
