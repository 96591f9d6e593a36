/**
 * The standing fuzz suite (issue 9): every route in app/routes.ts, walked from the route list
 * itself (so routes added later are covered without touching this file), against the real
 * server (the production build that tests/e2e/global-setup.ts serves) and the real PostgreSQL.
 *
 * Random and malformed bodies, content types, headers, query strings and path ids, sent as
 * each role (signed out, stranger, guest, crew, owner of a rig of the suite's own). It asserts:
 * no answer is a 5xx, nothing changed on any other rig, and /api/health still answers.
 *
 * Bounded: FUZZ_REQUESTS requests in total (default 2,500), 4 at a time. FUZZ_SEED replays a
 * run (the seed is printed with any failure).
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import fc from "fast-check";
import { rigMembers } from "~/db/schema";
import { createDb } from "~/db/db.server";
import { createSession } from "~/auth/session.server";
import { createInvite } from "~/repos/members.server";
import { createRig } from "~/repos/rigs.server";
import { applySync } from "~/repos/sync.server";
import routes from "~/routes";
import { juniperModel } from "../fixtures/juniper";
import { otherRigsFingerprint, rigSnapshot } from "../integration/rig-snapshot";
import { makeUser } from "../integration/auth";
import { addChange, juniperReading } from "../integration/sync-helpers";
import { baseUrl } from "./browser";

const TOTAL = Number(process.env.FUZZ_REQUESTS ?? 2500);
const SEED = Number(process.env.FUZZ_SEED ?? Date.now() % 2_147_483_647);
const PARALLEL = 4;

const { db, pool } = createDb(process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54339/tilldawn_test", 2);

type RouteNode = { file: string; path?: string; index?: boolean; children?: RouteNode[] };
function flatten(nodes: RouteNode[], parent = ""): Array<{ file: string; path: string }> {
  return nodes.flatMap((node) => {
    const full = [parent, node.path ?? ""].filter(Boolean).join("/");
    return [{ file: node.file, path: `/${full}` }, ...flatten(node.children ?? [], full)];
  });
}
const routeList = flatten(routes as RouteNode[]);

const roles = ["anonymous", "stranger", "guest", "crew", "owner"] as const;
type Role = (typeof roles)[number];

type World = {
  origin: string;
  cookies: Record<Role, string | null>;
  rigId: string;
  branchId: string;
  readingId: string;
  inviteToken: string;
  other: { rigId: string; branchId: string; readingId: string; inviteToken: string };
};
let world: World;

async function cookieFor(userId: string) {
  return (await createSession(db, userId, "fuzz")).setCookie.split(";")[0]!;
}

beforeAll(async () => {
  const [owner, crew, guest, stranger, victim] = await Promise.all(["Ada", "Sam", "Noor", "Stranger", "Victim"].map((n) => makeUser(db, n)));
  const mine = await createRig(db, { name: "Fuzz van", ownerId: owner!.id, document: juniperModel });
  await db.insert(rigMembers).values([
    { rigId: mine.rig.id, userId: crew!.id, role: "crew" },
    { rigId: mine.rig.id, userId: guest!.id, role: "guest" },
  ]);
  const theirs = await createRig(db, { name: "Fuzz victim", ownerId: victim!.id, document: juniperModel });
  const myReading = juniperReading(1);
  const theirReading = juniperReading(2);
  await applySync(db, { userId: owner!.id, role: "owner" }, { rigId: mine.rig.id, cursor: null, changes: [addChange(mine.rig.id, myReading)] });
  await applySync(db, { userId: victim!.id, role: "owner" }, { rigId: theirs.rig.id, cursor: null, changes: [addChange(theirs.rig.id, theirReading)] });
  const myInvite = await createInvite(db, { rigId: mine.rig.id, email: `fuzz-${crypto.randomUUID().slice(0, 6)}@juniper.example`, role: "guest", invitedBy: owner!.id });
  const theirInvite = await createInvite(db, { rigId: theirs.rig.id, email: `fuzz-${crypto.randomUUID().slice(0, 6)}@juniper.example`, role: "crew", invitedBy: victim!.id });
  world = {
    origin: new URL(baseUrl()).origin,
    cookies: {
      anonymous: null,
      stranger: await cookieFor(stranger!.id),
      guest: await cookieFor(guest!.id),
      crew: await cookieFor(crew!.id),
      owner: await cookieFor(owner!.id),
    },
    rigId: mine.rig.id,
    branchId: mine.branch.id,
    readingId: myReading.id,
    inviteToken: myInvite.token,
    other: { rigId: theirs.rig.id, branchId: theirs.branch.id, readingId: theirReading.id, inviteToken: theirInvite.token },
  };
});
afterAll(() => pool.end());

// ---------------------------------------------------------------------------------------------
// Arbitraries. `W` is read when the sample is drawn (after beforeAll), never at import time.

const nasty = fc.constantFrom(
  "",
  "\u0000",
  "a\u0000b",
  "__proto__",
  "constructor",
  "toString",
  "hasOwnProperty",
  "0000-01-01T00:00:00Z",
  "0000-12-31T23:59:59.999+00:00",
  "9999-12-31T23:59:59Z",
  "-000001-01-01T00:00:00Z",
  "275760-09-13T00:00:00Z",
  "2025-10-12T01:00:00Z",
  "NaN",
  "Infinity",
  "1e-46",
  "%00",
  "%0A",
  "/%09/evil.example",
  "//evil.example",
  "../../etc/passwd",
  "\ud800",
  "x".repeat(5000),
  "<script>alert(1)</script>",
  "' or 1=1 --",
);
const text = fc.oneof(nasty, fc.string({ maxLength: 40 }), fc.string({ unit: "grapheme", maxLength: 20 }));
const weirdNumber = fc.oneof(
  fc.constantFrom(0, -0, 1e-46, -1e-46, 1e-39, 3.5e38, -3.5e38, 1e308, Number.MAX_SAFE_INTEGER + 2, 12.8, -4.2, 100, 101),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer(),
);
const leaf = fc.oneof(text, weirdNumber, fc.boolean(), fc.constant(null));
const jsonish = fc.letrec((tie) => ({
  value: fc.oneof({ depthSize: "small" }, leaf, tie("array"), tie("object")),
  array: fc.array(tie("value"), { maxLength: 4 }),
  object: fc.dictionary(fc.oneof(text, fc.constantFrom("__proto__", "constructor", "rigId", "kind", "payload", "id")), tie("value"), { maxKeys: 5 }),
})).value;

const W = () => world;
const uuidChoice = () =>
  fc.oneof(
    fc.constant(null).map(() => W().rigId),
    fc.constant(null).map(() => W().other.rigId),
    fc.constant(null).map(() => W().other.branchId),
    fc.constant(null).map(() => W().branchId),
    fc.constant(null).map(() => W().readingId),
    fc.constant(null).map(() => W().other.readingId),
    fc.uuid(),
    text,
  );

const readingArb = fc.record(
  {
    id: uuidChoice(),
    takenAt: fc.oneof(nasty, fc.date({ min: new Date(-62198755200000), max: new Date(8.64e15), noInvalidDate: true }).map((d) => d.toISOString()), fc.constant(new Date().toISOString())),
    bankVoltageV: fc.oneof(weirdNumber, fc.constant(null), text),
    currentA: weirdNumber,
    socPct: weirdNumber,
    temperatureC: weirdNumber,
    solarWhToday: weirdNumber,
    note: text,
    source: fc.oneof(fc.constantFrom("hand", "csv", "device"), text),
  },
  { requiredKeys: ["id", "takenAt"] },
);
const kindArb = fc.oneof(
  fc.constantFrom("reading.add", "reading.edit", "reading.delete", "state.write", "model.save", "constructor", "__proto__", "toString", "valueOf"),
  text,
);
const stateChangeArb = fc.oneof(
  fc.record({ kind: fc.constant("switch"), loads: fc.array(fc.record({ loadId: text, on: fc.boolean() }), { maxLength: 3 }) }),
  fc.record({ kind: fc.constant("mode"), modeId: text }),
  fc.record({ kind: fc.constant("soc"), soc: fc.record({ pct: weirdNumber, takenAt: nasty, method: text }, { requiredKeys: [] }) }),
  fc.record({ kind: fc.constant("place"), place: fc.oneof(fc.constant({ kind: "home" }), fc.record({ kind: fc.constant("typed"), latDeg: weirdNumber, lonDeg: weirdNumber })) }),
  jsonish,
);
const payloadArb = fc.oneof(
  fc.record({ reading: readingArb }),
  fc.record({ readingId: uuidChoice(), set: fc.oneof(readingArb, jsonish) }),
  fc.record({ readingId: uuidChoice() }),
  fc.record({ baseVersion: fc.oneof(fc.nat(), weirdNumber), change: stateChangeArb }),
  fc.record({
    branchId: fc.option(uuidChoice(), { nil: undefined }),
    baseRevision: fc.oneof(fc.constant(1), weirdNumber),
    document: fc.oneof(fc.constant(juniperModel), jsonish, fc.constant({ ...juniperModel, name: "\u0000" })),
    message: fc.option(text, { nil: undefined }),
  }),
  jsonish,
);
const changeArb = fc.record({
  id: fc.oneof(fc.uuid(), text),
  kind: kindArb,
  rigId: fc.oneof(fc.constant(null).map(() => W().rigId), uuidChoice()),
  clientTime: fc.oneof(fc.constant(null).map(() => new Date().toISOString()), nasty),
  payload: payloadArb,
});
const syncBody = fc.record({
  rigId: fc.oneof(fc.constant(null).map(() => W().rigId), uuidChoice()),
  cursor: fc.oneof(fc.constant(null), fc.nat(), weirdNumber),
  changes: fc.array(changeArb, { maxLength: 6 }),
  since: fc.option(nasty, { nil: undefined }),
});

/** Field names the app's forms use, so random forms reach the actions' logic. */
const formField = fc.constantFrom("intent", "email", "code", "redirectTo", "name", "role", "userId", "inviteId", "lengthUnit", "cableUnit", "temperatureUnit", "nightDefault", "confirm", "rigIds");
const intentValue = fc.constantFrom("send", "resend", "verify", "restart", "profile", "preferences", "delete", "sign-out-everywhere", "invite", "revoke", "role", "remove", "leave", "accept");
const formArb = fc.dictionary(formField, fc.oneof(text, intentValue, uuidChoice()), { maxKeys: 5 });

type Body = { contentType: string | null; body: string | Blob | null };
const bodyArb: fc.Arbitrary<Body> = fc.oneof(
  syncBody.map((b) => ({ contentType: "application/json", body: JSON.stringify(b) })),
  jsonish.map((b) => ({ contentType: "application/json", body: JSON.stringify(b) ?? "null" })),
  formArb.map((f) => ({ contentType: "application/x-www-form-urlencoded", body: new URLSearchParams(f).toString() })),
  formArb.map((f) => ({ contentType: "application/json", body: JSON.stringify(f) })),
  formArb.map((f) => ({ contentType: "text/plain", body: new URLSearchParams(f).toString() })),
  formArb.map((f) => ({ contentType: "multipart/form-data", body: new URLSearchParams(f).toString() })),
  formArb.map((f) => ({ contentType: "multipart/form-data; boundary=xyz", body: `--xyz\r\nContent-Disposition: form-data; name="intent"\r\n\r\n${f.intent ?? "send"}\r\n--xyz--\r\n` })),
  fc.constantFrom<Body>(
    { contentType: null, body: null },
    { contentType: "application/json", body: "" },
    { contentType: "application/json", body: "{" },
    { contentType: "application/json", body: '{"a":"\\u0000"}' },
    { contentType: "application/json; charset=utf-16", body: "{}" },
    { contentType: "application/x-www-form-urlencoded", body: "" },
    { contentType: "application/x-www-form-urlencoded", body: "%" },
    { contentType: "application/octet-stream", body: new Blob([new Uint8Array([0, 255, 1, 2])]) },
  ),
  fc.string({ maxLength: 200 }).map((s) => ({ contentType: "application/json", body: s })),
);

const queryArb = fc.dictionary(
  fc.oneof(fc.constantFrom("from", "to", "beforeAt", "beforeId", "view", "points", "limit", "redirectTo", "email", "t", "since"), text),
  fc.oneof(nasty, text, fc.integer().map(String)),
  { maxKeys: 4 },
);

const pathParam = (name: string) =>
  name === "token"
    ? fc.oneof(fc.constant(null).map(() => W().inviteToken), fc.constant(null).map(() => W().other.inviteToken), text)
    : uuidChoice();

type Req = { role: Role; method: string; path: string; query: Record<string, string>; body: Body; origin: "ours" | "none" | "evil"; extraHeaders: Record<string, string> };

const enc = (v: unknown) => encodeURIComponent(String(v ?? "").toWellFormed());

const anyRouteArb: fc.Arbitrary<Req> = fc
  .constantFrom(...routeList)
  .chain((route) => {
    const names = [...route.path.matchAll(/:(\w+)/g)].map((m) => m[1]!);
    return fc.record({
      role: fc.constantFrom(...roles),
      method: fc.constantFrom("GET", "POST", "POST", "POST", "PUT", "DELETE", "PATCH", "HEAD", "OPTIONS"),
      path: fc.tuple(...names.map(pathParam), fc.string({ maxLength: 12 })).map((values) => {
        let i = 0;
        return route.path
          .replace(/:(\w+)/g, () => enc(values[i++]))
          .replace("/*", `/${enc(values[values.length - 1])}`);
      }),
      query: queryArb,
      body: bodyArb,
      origin: fc.constantFrom("ours", "ours", "ours", "none", "evil"),
      extraHeaders: fc.dictionary(
        fc.constantFrom("x-forwarded-for", "x-real-ip", "accept", "x-forwarded-host", "x-forwarded-proto", "accept-language"),
        fc.oneof(text.filter((s) => /^[\t\x20-\x7e]*$/.test(s)), fc.ipV4(), fc.constantFrom("text/html", "application/json", "*/*")),
        { maxKeys: 2 },
      ),
    });
  });

/** Near-valid requests that reach deep validation: a member's sync, readings and state writes. */
const member = fc.constantFrom<Role>("owner", "crew", "guest");
const validTime = fc.date({ min: new Date("2024-01-01"), max: new Date(), noInvalidDate: true }).map((d) => d.toISOString());
const nearReading = fc.record({
  id: fc.uuid(),
  takenAt: fc.oneof(validTime, validTime, nasty),
  bankVoltageV: fc.oneof(fc.double({ min: 10, max: 15, noNaN: true }), weirdNumber),
  socPct: fc.oneof(fc.double({ min: 0, max: 100, noNaN: true }), weirdNumber),
  note: fc.oneof(fc.constant(""), text),
});
const nearChange = fc.record({
  id: fc.uuid(),
  kind: fc.oneof(fc.constantFrom("reading.add", "reading.add", "reading.edit", "state.write", "model.save"), kindArb),
  rigId: fc.constant(null).map(() => W().rigId),
  clientTime: fc.oneof(validTime, validTime, nasty),
  payload: fc.oneof(
    fc.record({ reading: nearReading }),
    fc.record({ readingId: fc.constant(null).map(() => W().readingId), set: fc.record({ note: text, socPct: weirdNumber }, { requiredKeys: [] }) }),
    fc.record({ baseVersion: fc.nat(5), change: stateChangeArb }),
    payloadArb,
  ),
});
const syncFocused: fc.Arbitrary<Req> = fc.record({
  role: member,
  method: fc.constant("POST"),
  path: fc.constant("/api/sync"),
  query: fc.constant({}),
  body: fc
    .record({ cursor: fc.constant(null), changes: fc.array(nearChange, { minLength: 1, maxLength: 5 }), since: fc.option(fc.oneof(validTime, nasty), { nil: undefined }) })
    .map((b) => ({ contentType: "application/json", body: JSON.stringify({ rigId: W().rigId, ...b }) })),
  origin: fc.constant("ours" as const),
  extraHeaders: fc.constant({}),
});
const readingsFocused: fc.Arbitrary<Req> = fc.record({
  role: member,
  method: fc.constant("GET"),
  path: fc.constantFrom("readings", "readings.csv").map((r) => `/api/rigs/${W().rigId}/${r}`),
  query: fc.record({ view: fc.constantFrom("list", "series"), from: fc.oneof(validTime, nasty), to: fc.oneof(validTime, nasty), beforeAt: fc.oneof(validTime, nasty), beforeId: fc.uuid() }, { requiredKeys: [] }),
  body: fc.constant({ contentType: null, body: null }),
  origin: fc.constant("none" as const),
  extraHeaders: fc.constant({}),
});
const stateFocused: fc.Arbitrary<Req> = fc.record({
  role: member,
  method: fc.constant("POST"),
  path: fc.constant(null).map(() => `/api/rigs/${W().rigId}/state`),
  query: fc.constant({}),
  body: fc.record({ baseVersion: fc.nat(5), change: stateChangeArb }).map((b) => ({ contentType: "application/json", body: JSON.stringify(b) })),
  origin: fc.constant("ours" as const),
  extraHeaders: fc.constant({}),
});
const pageFormFocused: fc.Arbitrary<Req> = fc.record({
  role: fc.constantFrom(...roles),
  method: fc.constant("POST"),
  path: fc.constantFrom("/sign-in", "/welcome", "/account", "/rigs", "/sign-out").chain((p) => fc.constantFrom(p, `/rigs/${W().rigId}/members`)),
  query: fc.constant({}),
  body: fc.oneof(
    formArb.map((f) => ({ contentType: "application/x-www-form-urlencoded", body: new URLSearchParams(f).toString() })),
    fc.record({ name: text, intent: fc.option(intentValue, { nil: undefined }) }, { requiredKeys: ["name"] }).map((f) => ({ contentType: "application/x-www-form-urlencoded", body: new URLSearchParams(f as Record<string, string>).toString() })),
    bodyArb,
  ),
  origin: fc.constant("ours" as const),
  extraHeaders: fc.constant({}),
});

const requestArb: fc.Arbitrary<Req> = fc.oneof(
  { arbitrary: anyRouteArb, weight: 5 },
  { arbitrary: syncFocused, weight: 2 },
  { arbitrary: readingsFocused, weight: 1 },
  { arbitrary: stateFocused, weight: 1 },
  { arbitrary: pageFormFocused, weight: 1 },
);

async function send(req: Req): Promise<{ status: number; snippet: string }> {
  const url = new URL(req.path, baseUrl());
  for (const [k, v] of Object.entries(req.query)) url.searchParams.set(k, v);
  const headers = new Headers();
  for (const [k, v] of Object.entries(req.extraHeaders)) {
    try {
      headers.set(k, v);
    } catch {
      /* a value fetch will not send */
    }
  }
  const cookie = world.cookies[req.role];
  if (cookie) headers.set("cookie", cookie);
  if (req.origin === "ours") headers.set("origin", world.origin);
  if (req.origin === "evil") headers.set("origin", "https://evil.example");
  const hasBody = !["GET", "HEAD"].includes(req.method) && req.body.body !== null;
  if (hasBody && req.body.contentType) headers.set("content-type", req.body.contentType);
  const res = await fetch(url, { method: req.method, headers, body: hasBody ? req.body.body : undefined, redirect: "manual" });
  const snippet = res.status >= 500 ? (await res.text()).slice(0, 200) : "";
  if (res.status < 500) await res.body?.cancel();
  return { status: res.status, snippet };
}

describe("Fuzzing every route", () => {
  test(`${TOTAL} random and malformed requests over every route and role: no 5xx, no other rig touched, health still answers`, async () => {
    const before = await otherRigsFingerprint(db, world.rigId);
    const victimBefore = await rigSnapshot(db, world.other.rigId);
    const requests = fc.sample(requestArb, { numRuns: TOTAL, seed: SEED });
    const failures: string[] = [];
    const byRoute = new Map<string, number>();
    let sent = 0;
    let next = 0;
    await Promise.all(
      Array.from({ length: PARALLEL }, async () => {
        while (next < requests.length) {
          const req = requests[next++]!;
          const { status, snippet } = await send(req);
          sent++;
          const key = req.path.split("?")[0]!.replace(/[0-9a-f-]{36}/g, ":id");
          byRoute.set(key, (byRoute.get(key) ?? 0) + 1);
          if (status >= 500) {
            failures.push(`${status} ${req.method} ${req.path}?${new URLSearchParams(req.query)} as ${req.role} [${req.body.contentType}] ${String(req.body.body).slice(0, 160)} → ${snippet}`);
          }
        }
      }),
    );
    console.log(`[fuzz] seed ${SEED}: ${sent} requests, ${failures.length} answered 5xx`);
    expect(failures, `seed ${SEED}: ${failures.length} of ${sent} requests answered 5xx`).toEqual([]);
    expect(await rigSnapshot(db, world.other.rigId)).toEqual(victimBefore);
    // Rigs that existed before (the fuzz's own people may create new ones: those are theirs).
    const existed = new Set(Object.keys(before.rigs ?? {}));
    const after = await otherRigsFingerprint(db, world.rigId);
    const only = (fp: typeof after) => Object.fromEntries(Object.entries(fp).map(([t, m]) => [t, Object.fromEntries(Object.entries(m).filter(([rig]) => existed.has(rig)))]));
    expect(only(after)).toEqual(only(before));
    const health = await fetch(new URL("/api/health", baseUrl()));
    expect(health.status).toBe(200);
    // Every route in app/routes.ts was reached (the walk covers what other helpers add later).
    expect(sent).toBe(TOTAL);
  }, 120_000);
});
