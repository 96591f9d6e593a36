// POST /api/rigs/:rigId/compare against the real PostgreSQL: one rig in two positions and a
// draft against the as-built model, for any member; strangers and bad input refused.
import { afterAll, describe, expect, test } from "vitest";
import { openTestDb, testDatabaseUrl } from "./db";

process.env.DATABASE_URL ??= testDatabaseUrl;

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const { rigMembers, users } = await import("~/db/schema");
const { createSession } = await import("~/auth/session.server");
const { createRig } = await import("~/repos/rigs.server");
const compareRoute = await import("~/routes/api.rigs.$rigId.compare");
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

const compare = (rigId: string, call: Call) => run(compareRoute.action, request(`/api/rigs/${rigId}/compare`, "POST", call), rigId);
const at = "2026-10-15T19:30:00-06:00";

describe("comparison over states", () => {
  test("a guest compares the cab changeover on house and on starter: the laptop leaves protection", async () => {
    const j = await juniper();
    const res = await compare(j.rig.id, { cookie: j.noor.cookie, body: { a: { positions: { "sw-cab": "house" } }, b: { positions: { "sw-cab": "starter" }, label: "cab on starter" }, dateTime: at, banks: [{ bankId: "house", socPct: 80 }], horizonH: 24 } });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { comparison: { labels: { b: string }; outsideLowVoltageProtection: { added: string[] }; modes: { modeId: string }[] }; socAssumedFull: boolean };
    expect(body.comparison.labels.b).toBe("cab on starter");
    expect(body.comparison.outsideLowVoltageProtection.added).toEqual(["Laptop charging (USB-C)"]);
    expect(body.comparison.modes.map((m) => m.modeId)).toEqual(["parked-night", "travel-day", "storage"]);
    expect(body.socAssumedFull).toBe(false);
  });

  test("the owner compares a draft with a bigger bank against the rig as built", async () => {
    const j = await juniper();
    const draft = structuredClone(juniperModel);
    draft.banks[0]!.parallelCount = 4;
    const res = await compare(j.rig.id, { cookie: j.ada.cookie, body: { b: { model: draft }, dateTime: at, banks: [{ bankId: "house", socPct: 60 }], horizonH: 48 } });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { comparison: { modes: { modeId: string; a: { runwayH: number | null }; b: { runwayH: number | null } }[] } };
    const parked = body.comparison.modes.find((m) => m.modeId === "parked-night")!;
    expect(parked.b.runwayH ?? Infinity).toBeGreaterThan(parked.a.runwayH!);
  });

  test("bad input is a 400 with the path; a stranger gets 404", async () => {
    const j = await juniper();
    const bad = await compare(j.rig.id, { cookie: j.ada.cookie, body: { b: { positions: { "sw-cab": "sideways" } } } });
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { code: string } }).error.code).toBe("invalid_position");
    const badDraft = await compare(j.rig.id, { cookie: j.ada.cookie, body: { b: { model: { schemaVersion: 2 } } } });
    expect(badDraft.status).toBe(400);
    expect((await compare(j.rig.id, { cookie: j.stranger.cookie, body: { b: {} } })).status).toBe(404);
  });
});
