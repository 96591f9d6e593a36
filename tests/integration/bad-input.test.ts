// Findings 4, 9 and 10 of issue 9: bad input is a clear 4xx with the JSON error shape, one bad
// change in a sync batch is refused alone, and body limits hold while the body streams in.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { readings } from "~/db/schema";
import * as syncRoute from "~/routes/api.sync";
import * as stateRoute from "~/routes/api.rigs.$rigId.state";
import * as modesRoute from "~/routes/api.rigs.$rigId.modes";
import * as projectionRoute from "~/routes/api.v1.projection";
import * as readingsRoute from "~/routes/api.rigs.$rigId.readings";
import * as csvRoute from "~/routes/api.rigs.$rigId.readings.csv";
import * as signInRoute from "~/routes/sign-in";
import * as rigsRoute from "~/routes/rigs";
import * as welcomeRoute from "~/routes/welcome";
import * as accountRoute from "~/routes/account";
import * as membersRoute from "~/routes/rig.members";
import { openTestDb } from "./db";
import { callRoute, sessionCookieFor, TEST_ORIGIN, type CallResult } from "./auth";
import { addChange, change, juniperCrew, juniperReading } from "./sync-helpers";

const { db, pool } = openTestDb();
afterAll(() => pool.end());

let rigId: string;
let owner: string;
beforeAll(async () => {
  const crew = await juniperCrew(db);
  rigId = crew.rig.id;
  owner = await sessionCookieFor(db, crew.ada.id);
});

function expectJsonError(result: CallResult, status?: number) {
  if (status) expect(result.status, JSON.stringify(result.body)).toBe(status);
  expect(result.status).toBeGreaterThanOrEqual(400);
  expect(result.status).toBeLessThan(500);
  expect(result.headers.get("content-type") ?? "").toMatch(/application\/json/);
  expect(result.body).toMatchObject({ error: { code: expect.any(String), message: expect.any(String) } });
}

describe("A sync batch with bad changes keeps the good ones (finding 4)", () => {
  test("kinds that are Object.prototype names, a NUL in a note, a value real cannot hold and a year-0000 time are each refused alone", async () => {
    const good = addChange(rigId, juniperReading(0));
    const bad = [
      change(rigId, "constructor", {}),
      change(rigId, "__proto__", {}),
      change(rigId, "toString", {}),
      addChange(rigId, { ...juniperReading(1), note: "fridge\u0000door" }),
      addChange(rigId, { ...juniperReading(2), bankVoltageV: 1e-46 }),
      { ...addChange(rigId, juniperReading(3)), clientTime: "0000-01-01T00:00:00Z" },
      { ...addChange(rigId, juniperReading(4)), id: "not-a-uuid" },
      change(rigId, "model.save", { baseRevision: 1, document: { name: "a\u0000b" } }),
      change(rigId, "state.write", { baseVersion: 0, change: { kind: "soc", soc: { socPct: 50, source: "entered", takenAt: "0000-06-01T00:00:00Z" } } }),
    ];
    const result = await callRoute(syncRoute.action, { path: "/api/sync", cookie: owner, json: { rigId, cursor: null, changes: [...bad, good] } });
    expect(result.status, JSON.stringify(result.body)).toBe(200);
    const results = (result.body as { results: Array<{ status: string; reason?: string }> }).results;
    expect(results).toHaveLength(bad.length + 1);
    expect(results.slice(0, bad.length).map((r) => r.status)).toEqual(bad.map(() => "refused"));
    expect(results.slice(0, 3).map((r) => r.reason)).toEqual(["unsupported", "unsupported", "unsupported"]);
    expect(results.at(-1)!.status).toBe("applied");
    const stored = await db.select().from(readings).where(eq(readings.rigId, rigId));
    expect(stored.map((r) => r.id)).toEqual([(good.payload as { reading: { id: string } }).reading.id]);
  });
});

describe("A refused copy does not hide the real change (found by the sync property test)", () => {
  test("a corrupted copy sent before the real change, with the same id, in one batch: the copy is refused and the real one applied", async () => {
    const real = addChange(rigId, juniperReading(20));
    const copy = { ...real, payload: { reading: { ...(real.payload as { reading: object }).reading, note: "bad\u0000" } } };
    const result = await callRoute(syncRoute.action, { path: "/api/sync", cookie: owner, json: { rigId, cursor: null, changes: [copy, real] } });
    expect((result.body as { results: Array<{ status: string }> }).results.map((r) => r.status)).toEqual(["refused", "applied"]);
    const id = (real.payload as { reading: { id: string } }).reading.id;
    expect(await db.select().from(readings).where(eq(readings.id, id))).toHaveLength(1);
  });
});

describe("Bad input answers a clear 4xx (finding 9)", () => {
  const pageForms = [
    { name: "/sign-in", fn: signInRoute.action, path: "/sign-in", params: {} },
    { name: "/rigs", fn: rigsRoute.action, path: "/rigs", params: {} },
    { name: "/welcome", fn: welcomeRoute.action, path: "/welcome", params: {} },
    { name: "/account", fn: accountRoute.action, path: "/account", params: {} },
    { name: "/rigs/:rigId/members", fn: membersRoute.action, path: "", params: {} as Record<string, string> },
  ];
  const bodies: Array<{ what: string; type: string | null; body: string | null }> = [
    { what: "JSON", type: "application/json", body: '{"intent":"send","email":"ada@juniper.example"}' },
    { what: "text/plain", type: "text/plain", body: "intent=send" },
    { what: "an empty body with no type", type: null, body: null },
    { what: "multipart without a boundary", type: "multipart/form-data", body: "intent=send" },
  ];
  for (const form of pageForms) {
    for (const b of bodies) {
      test(`${form.name} sent as ${b.what} is a 4xx with the JSON error shape`, async () => {
        const path = form.path || `/rigs/${rigId}/members`;
        const params = form.path ? form.params : { rigId };
        const headers: Record<string, string> = { origin: TEST_ORIGIN };
        if (b.type) headers["content-type"] = b.type;
        const result = await callRoute(form.fn, { path, method: "POST", cookie: owner, params, headers, body: b.body });
        expectJsonError(result);
      });
    }
  }

  test("/sign-in with an unknown or missing intent is 400 with the JSON error shape", async () => {
    for (const form of [{ intent: "launch" }, {} as Record<string, string>]) {
      expectJsonError(await callRoute(signInRoute.action, { path: "/sign-in", form }), 400);
    }
  });

  test("a NUL in a rig name or a person's name is 400, and nothing is stored", async () => {
    expectJsonError(await callRoute(rigsRoute.action, { path: "/rigs", cookie: owner, form: { name: "Juni\u0000per" } }), 400);
    expectJsonError(await callRoute(welcomeRoute.action, { path: "/welcome", cookie: owner, form: { name: "A\u0000da" } }), 400);
    expectJsonError(await callRoute(accountRoute.action, { path: "/account", cookie: owner, form: { intent: "profile", name: "A\u0000da" } }), 400);
  });

  test("year-0000 dates in the readings API, the CSV export and a state write are 400 before anything runs", async () => {
    const params = { rigId };
    for (const q of ["from=0000-01-01T00:00:00Z", "view=series&from=0000-12-31T23:59:59.999%2B00:00&to=2026-01-01T00:00:00Z", "beforeAt=0000-01-01T00:00:00Z&beforeId=00000000-0000-4000-8000-000000000000"]) {
      expectJsonError(await callRoute(readingsRoute.loader, { path: `/api/rigs/${rigId}/readings?${q}`, cookie: owner, params }), 400);
    }
    for (const q of ["from=0000-01-01", "to=0000-01-01T00:00:00Z", "from=yesterday"]) {
      expectJsonError(await callRoute(csvRoute.loader, { path: `/api/rigs/${rigId}/readings.csv?${q}`, cookie: owner, params }), 400);
    }
    const csv = await callRoute(csvRoute.loader, { path: `/api/rigs/${rigId}/readings.csv?from=2025-10-01`, cookie: owner, params });
    expect(csv.status).toBe(200);
    const soc = { baseVersion: 0, change: { kind: "soc", soc: { socPct: 50, source: "entered", takenAt: "0000-01-01T00:00:00Z" } } };
    expectJsonError(await callRoute(stateRoute.action, { path: `/api/rigs/${rigId}/state`, cookie: owner, params, json: soc }), 400);
  });
});

/** A body of `bytes` bytes sent in chunks with no Content-Length, as a chunked upload is. */
function chunkedBody(bytes: number, start = '{"pad":"'): ReadableStream<Uint8Array> {
  let sent = 0;
  const chunk = new TextEncoder().encode("x".repeat(64 * 1024));
  return new ReadableStream({
    pull(controller) {
      if (sent === 0) controller.enqueue(new TextEncoder().encode(start));
      if (sent >= bytes) return controller.close();
      controller.enqueue(chunk);
      sent += chunk.byteLength;
    },
  });
}

describe("Body limits hold while the body streams in (finding 10)", () => {
  const jsonRoutes = [
    { name: "/api/sync (4 MB)", fn: syncRoute.action, path: "/api/sync", params: {}, bytes: 5 * 1024 * 1024 },
    { name: "/api/rigs/:rigId/state (64 KB)", fn: stateRoute.action, path: "state", params: {}, bytes: 200 * 1024 },
    { name: "/api/rigs/:rigId/modes (64 KB)", fn: modesRoute.action, path: "modes", params: {}, bytes: 200 * 1024 },
    { name: "/api/v1/projection (256 KB)", fn: projectionRoute.action, path: "/api/v1/projection", params: {}, bytes: 1024 * 1024 },
  ];
  for (const r of jsonRoutes) {
    test(`${r.name}: a chunked body over the limit is 413 with the JSON error shape`, async () => {
      const path = r.path.startsWith("/") ? r.path : `/api/rigs/${rigId}/${r.path}`;
      const result = await callRoute(r.fn, {
        path,
        method: "POST",
        cookie: owner,
        params: { rigId },
        headers: { origin: TEST_ORIGIN, "content-type": "application/json" },
        body: chunkedBody(r.bytes),
        context: { clientAddress: `198.51.100.${Math.floor(Math.random() * 250)}` },
      });
      expectJsonError(result, 413);
    });
  }

  test("a page form over 64 KB is 413", async () => {
    const result = await callRoute(rigsRoute.action, {
      path: "/rigs",
      method: "POST",
      cookie: owner,
      headers: { origin: TEST_ORIGIN, "content-type": "application/x-www-form-urlencoded" },
      body: chunkedBody(200 * 1024, "name="),
    });
    expectJsonError(result, 413);
  });
});
