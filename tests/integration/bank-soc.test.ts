// SoC entries for every bank through POST /api/rigs/:rigId/state (real PostgreSQL).
import { afterAll, describe, expect, test } from "vitest";
import { openTestDb, testDatabaseUrl } from "./db";

process.env.DATABASE_URL ??= testDatabaseUrl;

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const { rigMembers, users } = await import("~/db/schema");
const { createSession } = await import("~/auth/session.server");
const { createRig } = await import("~/repos/rigs.server");
const stateRoute = await import("~/routes/api.rigs.$rigId.state");
const { juniperModel } = await import("../fixtures/juniper");

const origin = "http://127.0.0.1:3000";

async function juniper() {
  const tag = crypto.randomUUID().slice(0, 8);
  const people = await db
    .insert(users)
    .values([
      { email: `ada-${tag}@juniper.example`, name: "Ada" },
      { email: `sam-${tag}@juniper.example`, name: "Sam" },
      { email: `noor-${tag}@juniper.example`, name: "Noor" },
      { email: `stranger-${tag}@elsewhere.example`, name: "Stranger" },
    ])
    .returning();
  const [ada, sam, noor, stranger] = people as [(typeof people)[number], (typeof people)[number], (typeof people)[number], (typeof people)[number]];
  const { rig } = await createRig(db, { name: `Juniper ${tag}`, ownerId: ada.id, document: juniperModel });
  await db.insert(rigMembers).values([
    { rigId: rig.id, userId: sam.id, role: "crew" },
    { rigId: rig.id, userId: noor.id, role: "guest" },
  ]);
  const cookie = async (userId: string) => (await createSession(db, userId)).setCookie.split(";")[0]!;
  return {
    rig,
    ada: { ...ada, cookie: await cookie(ada.id) },
    sam: { ...sam, cookie: await cookie(sam.id) },
    noor: { ...noor, cookie: await cookie(noor.id) },
    stranger: { ...stranger, cookie: await cookie(stranger.id) },
  };
}

type Call = { cookie?: string; body?: unknown; raw?: string; headers?: Record<string, string> };

function request(path: string, method: string, call: Call = {}) {
  const headers: Record<string, string> = { ...(call.cookie ? { cookie: call.cookie } : {}), ...call.headers };
  if (method !== "GET") {
    headers.origin ??= origin;
    headers["sec-fetch-site"] ??= "same-origin";
    headers["content-type"] ??= "application/json";
  }
  return new Request(`${origin}${path}`, {
    method,
    headers,
    ...(method !== "GET" ? { body: call.raw ?? JSON.stringify(call.body ?? {}) } : {}),
  });
}

/** Runs a loader or action, turning a thrown Response into the answer. */
async function run(fn: (args: never) => Promise<unknown> | unknown, req: Request, rigId: string): Promise<Response> {
  try {
    return (await fn({ request: req, params: { rigId }, context: {} } as never)) as Response;
  } catch (thrown) {
    if (thrown instanceof Response) return thrown;
    throw thrown;
  }
}

const getState = (rigId: string, cookie: string) => run(stateRoute.loader, request(`/api/rigs/${rigId}/state`, "GET", { cookie }), rigId);
const postState = (rigId: string, call: Call) => run(stateRoute.action, request(`/api/rigs/${rigId}/state`, "POST", call), rigId);

describe("SoC for every bank", () => {
  test("crew enter the starter battery's SoC; the house bank's stays; an unknown bank is a 400", async () => {
    const j = await juniper();
    const takenAt = new Date(Date.now() - 60_000).toISOString();
    const house = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 0, change: { kind: "soc", soc: { socPct: 64, source: "entered", takenAt } } } });
    expect(house.status).toBe(200);
    const starter = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 1, change: { kind: "soc", bankId: "starter", soc: { socPct: 88, source: "entered", takenAt } } } });
    expect(starter.status).toBe(200);
    const body = (await starter.json()) as { state: { soc: { socPct: number }; bankSocs?: Record<string, { socPct: number }> } };
    expect(body.state.soc.socPct).toBe(64);
    expect(body.state.bankSocs?.starter?.socPct).toBe(88);
    const bad = await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 2, change: { kind: "soc", bankId: "nowhere", soc: { socPct: 50, source: "entered", takenAt } } } });
    expect(bad.status).toBe(400);
  });
});

describe("every switch has a position in the state", () => {
  test("GET answers each switch's position and where it came from", async () => {
    const j = await juniper();
    await postState(j.rig.id, { cookie: j.sam.cookie, body: { baseVersion: 0, change: { kind: "switch", loads: [{ loadId: "laptop", on: true }], positions: [{ switchId: "sw-cab", position: "off" }] } } });
    const res = await getState(j.rig.id, j.noor.cookie);
    const body = (await res.json()) as { switchPositions: { switchId: string; position: string; origin: string }[] };
    expect(body.switchPositions).toHaveLength(juniperModel.switches.length);
    // The changeover set to "off" is off (and conducts nowhere); the enable follows the fridge.
    expect(body.switchPositions.find((p) => p.switchId === "sw-cab")).toMatchObject({ position: "off", origin: "set" });
    expect(body.switchPositions.find((p) => p.switchId === "sw-bank-enable")).toMatchObject({ position: "on", origin: "follows-loads" });
  });
});
