/**
 * Device tokens and device ingest. An owner creates a token per device aboard (named); the
 * token is shown once and only its SHA-256 is kept. A device posts readings with it; each
 * reading's id is derived from the device and the reading's time, so a reading sent twice is
 * stored once (idempotent on (device, takenAt)). Readings land in the logbook (source
 * "device", the device's name in the note, `device_readings` linking them) and in the rig's
 * change log, so phones sync them like any other reading.
 */
import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { deviceTokens } from "~/db/schema";
import { checkDeviceReading, type DeviceReading, type ReadingIssue } from "~/alerts/device-readings";
import { primaryBank } from "~/components/now/now-model";
import { bankNominalV } from "~/engine/battery";
import { getAsBuiltModel } from "./models.server";
import { lockRigLog } from "./sync.server";

export const TOKEN_PREFIX = "tdd_";

export function hashToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

export async function createDeviceToken(db: Db, input: { rigId: string; name: string; createdBy: string }) {
  const token = `${TOKEN_PREFIX}${randomBytes(32).toString("base64url")}`;
  const [row] = await db
    .insert(deviceTokens)
    .values({ rigId: input.rigId, name: input.name, tokenHash: hashToken(token), createdBy: input.createdBy })
    .returning({ id: deviceTokens.id, name: deviceTokens.name, createdAt: deviceTokens.createdAt });
  return { ...row!, token };
}

export async function listDeviceTokens(db: Db, rigId: string) {
  return db
    .select({ id: deviceTokens.id, name: deviceTokens.name, createdAt: deviceTokens.createdAt, lastUsedAt: deviceTokens.lastUsedAt, revokedAt: deviceTokens.revokedAt })
    .from(deviceTokens)
    .where(eq(deviceTokens.rigId, rigId))
    .orderBy(desc(deviceTokens.createdAt));
}

export async function revokeDeviceToken(db: Db, rigId: string, id: string) {
  const rows = await db
    .update(deviceTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(deviceTokens.rigId, rigId), eq(deviceTokens.id, id), isNull(deviceTokens.revokedAt)))
    .returning({ id: deviceTokens.id });
  return rows.length > 0;
}

export type Device = { id: string; rigId: string; name: string };

/** The device a bearer token belongs to, when it is live (not revoked). */
export async function findDevice(db: Db, token: string): Promise<Device | null> {
  if (!token.startsWith(TOKEN_PREFIX) || token.length > 200) return null;
  const [row] = await db
    .select({ id: deviceTokens.id, rigId: deviceTokens.rigId, name: deviceTokens.name })
    .from(deviceTokens)
    .where(and(eq(deviceTokens.tokenHash, hashToken(token)), isNull(deviceTokens.revokedAt)));
  return row ?? null;
}

/** The reading id for (device, time): a UUID (version 8, RFC 9562) from a SHA-256 of both. */
export function deviceReadingId(deviceId: string, takenAtMs: number): string {
  const h = createHash("sha256").update(`device-reading:${deviceId}:${takenAtMs}`).digest();
  h[6] = (h[6]! & 0x0f) | 0x80;
  h[8] = (h[8]! & 0x3f) | 0x80;
  const x = h.subarray(0, 16).toString("hex");
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20, 32)}`;
}

/**
 * Stores a device's checked readings: one statement each for the readings, their device links
 * and the change log, under the rig's change-log lock. Answers the ids stored now (the others
 * were there already).
 */
export async function storeDeviceReadings(db: Db, device: Device, list: DeviceReading[], receivedAt = new Date()): Promise<{ ids: string[]; stored: Set<string> }> {
  const ids = list.map((r) => deviceReadingId(device.id, Date.parse(r.takenAt)));
  if (!list.length) return { ids, stored: new Set() };
  const at = receivedAt.toISOString();
  const col = <T,>(pick: (r: DeviceReading) => T) => sql.param(list.map(pick));
  const stored = await db.transaction(async (tx) => {
    await lockRigLog(tx, device.rigId);
    const inserted = await tx.execute<{ id: string }>(sql`
      insert into readings (id, rig_id, author_id, taken_at, bank_voltage_v, current_a, soc_pct, temperature_c, solar_wh_today, note, source, created_at, updated_at)
      select u.id, ${device.rigId}::uuid, null, u.taken_at, u.v, u.a, u.soc, u.t, u.wh, u.note, 'device', ${at}::timestamptz, ${at}::timestamptz
      from unnest(
        ${sql.param(ids)}::uuid[],
        ${col((r) => r.takenAt)}::timestamptz[],
        ${col((r) => r.bankVoltageV ?? null)}::real[],
        ${col((r) => r.currentA ?? null)}::real[],
        ${col((r) => r.socPct ?? null)}::real[],
        ${col((r) => r.temperatureC ?? null)}::real[],
        ${col((r) => r.solarWhToday ?? null)}::real[],
        ${col((r) => (r.note ? `${device.name}: ${r.note}` : device.name))}::text[]
      ) as u(id, taken_at, v, a, soc, t, wh, note)
      on conflict (id) do nothing
      returning id`);
    const newIds = inserted.rows.map((r) => r.id);
    if (newIds.length) {
      await tx.execute(sql`
        insert into device_readings (reading_id, device_id)
        select id, ${device.id}::uuid from unnest(${sql.param(newIds)}::uuid[]) as u(id)
        on conflict do nothing`);
      await tx.execute(sql`
        insert into sync_changes (change_id, rig_id, kind, entity_id, author_id, client_time, server_time)
        select gen_random_uuid(), ${device.rigId}::uuid, 'reading.add', id::text, null, ${at}::timestamptz, ${at}::timestamptz
        from unnest(${sql.param(newIds)}::uuid[]) as u(id)`);
    }
    await tx.update(deviceTokens).set({ lastUsedAt: receivedAt }).where(eq(deviceTokens.id, device.id));
    return new Set(newIds);
  });
  return { ids, stored };
}

export type DeviceReadingResult = { index: number; status: "stored" | "duplicate" | "refused"; readingId?: string; issues?: ReadingIssue[] };

/**
 * A device's posted readings, each checked alone against the rig's bank (refused ones listed with
 * their index and paths under `readings.N` in a batch; repeats of one `takenAt` are duplicates),
 * the good ones stored. A single refused reading refuses the request.
 */
export async function ingestDeviceReadings(
  db: Db,
  device: Device,
  items: unknown[],
  batch: boolean,
  receivedAt: Date,
): Promise<
  | { ok: true; results: DeviceReadingResult[]; stored: number }
  | { ok: false; code: "model_unreadable" }
  | { ok: false; code: "invalid_reading"; issues: ReadingIssue[] }
> {
  const asBuilt = await getAsBuiltModel(db, device.rigId);
  if (!asBuilt) return { ok: false, code: "model_unreadable" };
  const nominalV = bankNominalV(primaryBank(asBuilt.model));

  const results: DeviceReadingResult[] = [];
  const good: DeviceReading[] = [];
  const goodIndex: number[] = [];
  const seen = new Set<number>();
  items.forEach((item, index) => {
    const r = checkDeviceReading(item, nominalV);
    if (!r.ok) {
      results[index] = { index, status: "refused", issues: r.issues.map((i) => ({ ...i, path: batch ? ["readings", index, ...i.path] : i.path })) };
      return;
    }
    const t = Date.parse(r.reading.takenAt);
    if (seen.has(t)) {
      results[index] = { index, status: "duplicate" };
      return;
    }
    seen.add(t);
    good.push(r.reading);
    goodIndex.push(index);
  });

  if (!batch && results[0]?.status === "refused") {
    return { ok: false, code: "invalid_reading", issues: results[0].issues! };
  }

  const { ids, stored } = await storeDeviceReadings(db, device, good, receivedAt);
  goodIndex.forEach((index, k) => {
    const id = ids[k]!;
    results[index] = { index, status: stored.has(id) ? "stored" : "duplicate", readingId: id };
  });
  return { ok: true, results, stored: stored.size };
}
