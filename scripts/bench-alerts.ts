// Alerts and device ingest benchmarks against the real database (DATABASE_URL; a throw-away
// one: this adds 10,000 rigs). `npm run bench` runs it; alone:
//   DATABASE_URL=postgres://… node --import tsx scripts/bench-alerts.ts [--rigs 1000,10000]
//
// 1. The schedule's pass over the time-based rules (evaluateTimeBased) for 1,000 and then
//    10,000 watched rigs, each with a week of hourly readings (168) and its own model revision:
//    a first pass (opens episodes and writes deliveries) and a second one (nothing changes).
//    Target: under 30 s for 10,000.
// 2. Device ingest in batches of 1,000 (the route's work: per-reading checks against the bank,
//    readings + device links + change log under the rig's lock) against a raw multi-row INSERT
//    of the same rows into the same table, same run. Target: ingest ≥ 0.5 × raw.
import { sql } from "drizzle-orm";
import { checkDeviceReading, type DeviceReading } from "../app/alerts/device-readings";
import { evaluateTimeBased } from "../app/alerts/evaluate.server";
import { createDb } from "../app/db/db.server";
import { SCHEMA_VERSION } from "../app/engine/model";
import { getEnv } from "../app/env.server";
import { createDeviceToken, storeDeviceReadings } from "../app/repos/devices.server";
import { createRig } from "../app/repos/rigs.server";
import { juniperModel } from "../tests/fixtures/juniper";

const env = getEnv();
const { db, pool } = createDb(env.DATABASE_URL, 8);
const arg = process.argv.indexOf("--rigs");
const sizes = (arg > 0 ? process.argv[arg + 1]! : "1000,10000").split(",").map(Number);
/** `--no-dawn-plan`: leave the dawn plan out of the alerts (to see what it costs the first pass). */
const noDawnPlan = process.argv.includes("--no-dawn-plan");
// 04:00 UTC, 14 October 2026: night at Juniper's home (22:00 MDT).
const NOW = Date.parse("2026-10-14T04:00:00Z");

const [bencher] = (await db.execute<{ id: string }>(sql`insert into users (email, name) values (${`bench-${Date.now()}@juniper.example`}, 'Bench') returning id`)).rows;
const userId = bencher!.id;
// One browser subscribed, so opened episodes write their push deliveries (not sent here).
await db.execute(sql`insert into push_subscriptions (user_id, endpoint, p256dh, auth) values (${userId}::uuid, ${`https://push.invalid/${userId}`}, 'bench', 'bench')`);

/** Adds rigs up to `target` benchmark rigs: model, member, "Warn me", a week of hourly readings ending an hour before NOW. */
async function growTo(target: number, have: number) {
  const n = target - have;
  if (n <= 0) return;
  const t0 = performance.now();
  const doc = JSON.stringify(juniperModel);
  for (let done = 0; done < n; done += 1000) {
    const k = Math.min(1000, n - done);
    await db.transaction(async (tx) => {
      await tx.execute(sql`
        with new_rigs as (
          insert into rigs (name) select 'Bench rig ' || (${have + done} + g) from generate_series(1, ${k}) g returning id
        ), members as (
          insert into rig_members (rig_id, user_id, role) select id, ${userId}::uuid, 'owner' from new_rigs returning rig_id
        ), prefs as (
          insert into alert_preferences (rig_id, user_id, rules, time_zone, push, email, unsubscribe_token)
          select rig_id, ${userId}::uuid, '["runway_low","soc_low","voltage_low","no_reading","charging_stopped","falls_short"]'::jsonb, 'America/Denver', true, false, md5(random()::text || rig_id::text)
          from members returning rig_id
        ), branches as (
          insert into model_branches (rig_id, kind, name, head_revision) select rig_id, 'as_built', 'As built', 1 from prefs returning id, rig_id
        ), revs as (
          insert into model_revisions (branch_id, revision, schema_version, document) select id, 1, ${SCHEMA_VERSION}, ${doc}::jsonb from branches returning branch_id
        )
        insert into readings (id, rig_id, taken_at, bank_voltage_v, current_a, soc_pct, source)
        select gen_random_uuid(), b.rig_id, ${new Date(NOW).toISOString()}::timestamptz - make_interval(hours => h),
               13.0 + random() * 0.4, -5 + random() * 10, 30 + random() * 60 + (case when h = 1 and random() < 0.1 then -45 else 0 end), 'device'
        from branches b cross join generate_series(1, 168) h`);
    });
  }
  await db.execute(sql`analyze`);
  console.log(`  (set-up: ${n.toLocaleString("en")} rigs with ${(n * 168).toLocaleString("en")} readings in ${((performance.now() - t0) / 1000).toFixed(1)} s)`);
}

console.log("## Alerts: the schedule's pass over the time-based rules");
let have = 0;
for (const size of sizes) {
  await growTo(size, have);
  have = size;
  const watched = (await db.execute<{ n: number }>(sql`select count(distinct rig_id)::int as n from alert_preferences`)).rows[0]!.n;
  for (const pass of ["first pass (opens episodes, writes deliveries)", "second pass (no change)"]) {
    const t0 = performance.now();
    const r = await evaluateTimeBased(db, NOW + (pass.startsWith("first") ? 0 : 60_000) + size, { appUrl: "http://bench.invalid", ...(noDawnPlan ? { dawnPlanLine: null } : {}) });
    const s = (performance.now() - t0) / 1000;
    console.log(`${size.toLocaleString("en")} rigs (${watched.toLocaleString("en")} watched, a week of hourly readings each), ${pass}: ${s.toFixed(1)} s, ${r.rigs} rigs evaluated, ${r.opened} opened, ${r.cleared} cleared, ${r.deliveryIds.length} deliveries (${((s * 1000) / r.rigs).toFixed(2)} ms a rig)`);
  }
}

console.log("\n## Device ingest: batches of 1,000 vs a raw multi-row INSERT of the same rows");
const { rig } = await createRig(db, { name: "Bench ingest", ownerId: userId, document: juniperModel });
const device = await createDeviceToken(db, { rigId: rig.id, name: "Bench reader", createdBy: userId });
const BATCHES = 20;
const start = Date.parse("2025-01-01T00:00:00Z");
const batches: unknown[][] = [];
for (let b = 0; b < BATCHES; b++) {
  batches.push(
    Array.from({ length: 1000 }, (_, i) => ({
      takenAt: new Date(start + (b * 1000 + i) * 60_000).toISOString(),
      bankVoltageV: 13.1 + (i % 7) * 0.01,
      currentA: -4 + (i % 11) * 0.5,
      socPct: 60 + (i % 30),
      temperatureC: 18,
      solarWhToday: i,
    })),
  );
}
// The route's JSON parse is included on both sides (a raw insert gets its rows from somewhere too).
const bodies = batches.map((rows) => JSON.stringify({ readings: rows }));

async function rawInsert(rows: Array<Record<string, unknown>>, rigId: string) {
  const values = rows.map((r) => sql`(gen_random_uuid(), ${rigId}::uuid, ${r.takenAt}::timestamptz, ${r.bankVoltageV}, ${r.currentA}, ${r.socPct}, ${r.temperatureC}, ${r.solarWhToday}, 'device')`);
  await db.execute(sql`insert into readings (id, rig_id, taken_at, bank_voltage_v, current_a, soc_pct, temperature_c, solar_wh_today, source) values ${sql.join(values, sql`, `)}`);
}

const { rig: rawRig } = await createRig(db, { name: "Bench raw", ownerId: userId, document: juniperModel });
// Warm both paths once (JIT, plans), on throw-away times.
await rawInsert(JSON.parse(bodies[0]!).readings.slice(0, 10).map((r: { takenAt: string }) => ({ ...r, takenAt: new Date(Date.parse(r.takenAt) - 1e10).toISOString() })), rawRig.id);

let ingestMs = 0;
let rawMs = 0;
for (let b = 0; b < BATCHES; b++) {
  // Alternate which goes first, so neither always meets a warmer cache.
  const runIngest = async () => {
    const t0 = performance.now();
    const items = (JSON.parse(bodies[b]!) as { readings: unknown[] }).readings;
    const good: DeviceReading[] = [];
    for (const item of items) {
      const r = checkDeviceReading(item, 12.8);
      if (r.ok) good.push(r.reading);
    }
    const { stored } = await storeDeviceReadings(db, { id: device.id, rigId: rig.id, name: device.name }, good);
    if (stored.size !== 1000) throw new Error(`stored ${stored.size}`);
    ingestMs += performance.now() - t0;
  };
  const runRaw = async () => {
    const t0 = performance.now();
    await rawInsert((JSON.parse(bodies[b]!) as { readings: Array<Record<string, unknown>> }).readings, rawRig.id);
    rawMs += performance.now() - t0;
  };
  if (b % 2) {
    await runIngest();
    await runRaw();
  } else {
    await runRaw();
    await runIngest();
  }
}
const rows = BATCHES * 1000;
const ingestRate = rows / (ingestMs / 1000);
const rawRate = rows / (rawMs / 1000);
console.log(`device ingest (checks + readings + device links + change log): ${Math.round(ingestRate).toLocaleString("en")} readings/s (${(ingestMs / BATCHES).toFixed(0)} ms a batch of 1,000)`);
console.log(`raw multi-row INSERT of the same rows:                          ${Math.round(rawRate).toLocaleString("en")} readings/s (${(rawMs / BATCHES).toFixed(0)} ms a batch of 1,000)`);
console.log(`ratio ingest / raw: ${(ingestRate / rawRate).toFixed(2)} (goal ≥ 0.5)`);
await pool.end();
