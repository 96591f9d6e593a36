// POST /api/rigs/:rigId/compare against the real PostgreSQL: one rig in two positions and a
// draft against the as-built model, for any member; strangers and bad input refused.
import { afterAll, describe, expect, test } from "vitest";
import { openTestDb, testDatabaseUrl } from "./db";
import type { Call } from "./juniper-people";

process.env.DATABASE_URL ??= testDatabaseUrl;

const { db, pool } = openTestDb();
afterAll(() => pool.end());

const compareRoute = await import("~/routes/api.rigs.$rigId.compare");
const { juniperModel } = await import("../fixtures/juniper");

const { juniperWithPeople, request, run } = await import("./juniper-people");
const juniper = () => juniperWithPeople(db);

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
