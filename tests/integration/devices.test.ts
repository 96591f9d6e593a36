import { eq } from "drizzle-orm";
import { afterAll, describe, expect, test } from "vitest";
import { deviceReadings, deviceTokens, readings, syncChanges } from "~/db/schema";
import { hashToken } from "~/repos/devices.server";
import * as alertsPage from "~/routes/rig.alerts";
import * as ingestRoute from "~/routes/api.v1.rigs.$rigId.readings";
import { callRoute } from "./auth";
import { openTestDb } from "./db";
import { makeJuniper } from "./alerts-helpers";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

async function createToken(rigId: string, cookie: string, name: string) {
  const res = await callRoute(alertsPage.action, { path: `/rigs/${rigId}/alerts`, cookie, params: { rigId }, form: { intent: "device-create", name } });
  expect(res.status).toBe(200);
  return (res.body as { token: { value: string } }).token.value;
}

async function post(rigId: string, token: string | null, body: unknown) {
  return callRoute(ingestRoute.action, {
    path: `/api/v1/rigs/${rigId}/readings`,
    json: body,
    origin: null,
    headers: token ? { authorization: `Bearer ${token}` } : {},
    params: { rigId },
  });
}

const t = (minutesAgo: number) => new Date(Date.now() - minutesAgo * 60_000).toISOString();
type Answer = { stored: number; duplicate: number; refused: number; results: Array<{ index: number; status: string; readingId?: string; issues?: Array<{ path: unknown[]; message: string }> }> };

describe("device tokens", () => {
  test("an owner creates a named token, shown once and stored only as its SHA-256; crew and guests may not", async () => {
    const j = await makeJuniper(db);
    const token = await createToken(j.rig.id, j.ownerCookie, "Shunt reader");
    expect(token).toMatch(/^tdd_[A-Za-z0-9_-]{43}$/);
    const [row] = await db.select().from(deviceTokens).where(eq(deviceTokens.rigId, j.rig.id));
    expect(row!.tokenHash).toBe(hashToken(token));
    expect(JSON.stringify(row)).not.toContain(token);
    const page = await callRoute(alertsPage.loader, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.ownerCookie, params: { rigId: j.rig.id } });
    expect(JSON.stringify(page.body)).not.toContain(token);
    const guest = await callRoute(alertsPage.action, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.guestCookie, params: { rigId: j.rig.id }, form: { intent: "device-create", name: "Mine" } });
    expect(guest.status).toBe(403);
  });

  test("a missing, wrong, revoked or other rig's token is refused with 401", async () => {
    const j = await makeJuniper(db);
    const other = await makeJuniper(db, "Other rig");
    const token = await createToken(j.rig.id, j.ownerCookie, "Shunt reader");
    const otherToken = await createToken(other.rig.id, other.ownerCookie, "Their reader");
    const reading = { takenAt: t(1), bankVoltageV: 13.2 };
    expect((await post(j.rig.id, null, reading)).status).toBe(401);
    expect((await post(j.rig.id, "tdd_not-a-real-token", reading)).status).toBe(401);
    expect((await post(j.rig.id, otherToken, reading)).status).toBe(401);
    expect((await post(j.rig.id, token, reading)).status).toBe(200);
    const [row] = await db.select().from(deviceTokens).where(eq(deviceTokens.tokenHash, hashToken(token)));
    expect(row!.lastUsedAt).not.toBeNull();
    const revoke = await callRoute(alertsPage.action, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.ownerCookie, params: { rigId: j.rig.id }, form: { intent: "device-revoke", id: row!.id } });
    expect(revoke.status).toBe(200);
    const refused = await post(j.rig.id, token, { takenAt: t(0.5), bankVoltageV: 13.2 });
    expect(refused.status).toBe(401);
    expect((refused.body as { error: { code: string } }).error.code).toBe("bad_token");
  });
});

describe("device ingest", () => {
  test("idempotent on (device, time): the same batch twice stores each reading once", async () => {
    const j = await makeJuniper(db);
    const token = await createToken(j.rig.id, j.ownerCookie, "Shunt reader");
    const batch = { readings: Array.from({ length: 50 }, (_, i) => ({ takenAt: t(60 - i), bankVoltageV: 13.1, currentA: -4.2, socPct: 70 - i * 0.1 })) };
    const first = (await post(j.rig.id, token, batch)).body as Answer;
    expect([first.stored, first.duplicate, first.refused]).toEqual([50, 0, 0]);
    const second = (await post(j.rig.id, token, batch)).body as Answer;
    expect([second.stored, second.duplicate, second.refused]).toEqual([0, 50, 0]);
    expect(second.results.map((r) => r.readingId)).toEqual(first.results.map((r) => r.readingId));
    const rows = await db.select().from(readings).where(eq(readings.rigId, j.rig.id));
    expect(rows.length).toBe(50);
    // In the logbook as device readings marked with the device's name, in the change log for phones, linked to the device.
    expect(rows.every((r) => r.source === "device" && r.note === "Shunt reader" && r.authorId === null)).toBe(true);
    expect((await db.select().from(syncChanges).where(eq(syncChanges.rigId, j.rig.id))).length).toBe(50);
    expect((await db.select().from(deviceReadings).where(eq(deviceReadings.readingId, rows[0]!.id))).length).toBe(1);
  });

  test("each reading is checked alone: 120 V on a 12 V bank, NaN, NUL and year 0000 are refused by name, the rest kept", async () => {
    const j = await makeJuniper(db);
    const token = await createToken(j.rig.id, j.ownerCookie, "Shunt reader");
    const res = await post(j.rig.id, token, {
      readings: [
        { takenAt: t(10), bankVoltageV: 13.2 },
        { takenAt: t(9), bankVoltageV: 120 },
        { takenAt: t(8), bankVoltageV: "NaN" },
        { takenAt: t(7), bankVoltageV: 13.1, note: "ok\u0000" },
        { takenAt: "0000-01-01T00:00:00Z", bankVoltageV: 13.1 },
        { takenAt: t(6), socPct: 65, note: "after the hob" },
      ],
    });
    expect(res.status).toBe(200);
    const a = res.body as Answer;
    expect(a.results.map((r) => r.status)).toEqual(["stored", "refused", "refused", "refused", "refused", "stored"]);
    expect(a.results[1]!.issues![0]!.path).toEqual(["readings", 1, "bankVoltageV"]);
    expect(a.results[1]!.issues![0]!.message).toContain("12.8 V bank");
    expect(a.results[2]!.issues![0]!.path).toEqual(["readings", 2, "bankVoltageV"]);
    expect(a.results[3]!.issues![0]!.message).toContain("NUL");
    expect(a.results[4]!.issues![0]!.path).toEqual(["readings", 4, "takenAt"]);
    const notes = (await db.select().from(readings).where(eq(readings.rigId, j.rig.id))).map((r) => r.note).sort();
    expect(notes).toEqual(["Shunt reader", "Shunt reader: after the hob"]);
  });

  test("a single bad reading is a 400 naming the field; bad JSON and a bad envelope are 4xx, never 500", async () => {
    const j = await makeJuniper(db);
    const token = await createToken(j.rig.id, j.ownerCookie, "Shunt reader");
    const one = await post(j.rig.id, token, { takenAt: t(1), bankVoltageV: 120 });
    expect(one.status).toBe(400);
    expect((one.body as { error: { issues: Array<{ path: string[] }> } }).error.issues[0]!.path).toEqual(["bankVoltageV"]);
    expect((await post(j.rig.id, token, { readings: "lots" })).status).toBe(400);
    expect((await post(j.rig.id, token, { readings: [] })).status).toBe(400);
    expect((await post(j.rig.id, token, [1, 2])).status).toBe(400);
    const bad = await callRoute(ingestRoute.action, {
      path: `/api/v1/rigs/${j.rig.id}/readings`,
      method: "POST",
      origin: null,
      headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
      params: { rigId: j.rig.id },
    });
    expect(bad.status).toBe(400);
  });

  test("rate-limited per token: beyond 120 requests a minute the answer is 429 with Retry-After", async () => {
    const j = await makeJuniper(db);
    const token = await createToken(j.rig.id, j.ownerCookie, "Chatty reader");
    let last = 0;
    let retryAfter: string | null = null;
    for (let i = 0; i < 121; i++) {
      const res = await post(j.rig.id, token, { readings: "x" });
      last = res.status;
      retryAfter = res.headers.get("retry-after");
    }
    expect(last).toBe(429);
    expect(Number(retryAfter)).toBeGreaterThan(0);
  });
});
