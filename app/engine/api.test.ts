import { describe, expect, it } from "vitest";
import requestFixture from "../../tests/fixtures/projection-request.json";
import { parseProjectionRequest, projectionRequestJsonSchema, runProjectionRequest } from "./api";
import { handleProjectionRequest } from "./api-test-helper";

const body = structuredClone(requestFixture) as Record<string, unknown>;

describe("POST /api/v1/projection contract", () => {
  it("answers the fixture request with projection, budget, audit and circuit graph", () => {
    const res = handleProjectionRequest(body);
    expect(res.status).toBe(200);
    if (res.status !== 200) return;
    const r = res.body;
    expect(r.projection.banks.map((b) => b.bankId)).toEqual(["house", "starter"]);
    expect(r.projection.timesMs).toHaveLength(72 * 12 + 1);
    expect(r.projection.banks[0]!.socPct).toHaveLength(72 * 12 + 1);
    expect(r.budget.modeName).toBe("Parked night");
    expect(r.audit.failureCount).toBe(0);
    expect(r.circuitGraph.loads.find((l) => l.loadId === "hob")!.switchCount).toBe(4);
    expect(r.autonomy[0]!.daysNoCharge).toBeGreaterThan(0);
    // Plain JSON: survives a round trip unchanged (no NaN, Infinity or typed arrays).
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
  });

  it("can leave out the curves", () => {
    const parsed = parseProjectionRequest({ ...body, options: { includeCurves: false } });
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const r = runProjectionRequest(parsed.value);
    expect(r.projection.timesMs).toBeUndefined();
    expect(r.projection.banks[0]!.socPct).toBeUndefined();
  });

  it("answers 400 with zod issue paths for bad input", () => {
    const bad = structuredClone(body) as { state: { weatherFactor: unknown }; model: { banks: { ratedAh: unknown }[] } };
    bad.state.weatherFactor = 3;
    bad.model.banks[0]!.ratedAh = "lots";
    const res = handleProjectionRequest(bad);
    expect(res.status).toBe(400);
    if (res.status !== 400) return;
    const paths = res.body.issues.map((i) => i.path.join("."));
    expect(paths).toContain("state.weatherFactor");
    expect(paths).toContain("model.banks.0.ratedAh");
    expect(res.body.code).toBe("invalid_request");
  });

  it("answers 400 for unknown ids in the state and the model", () => {
    const bad = structuredClone(body) as { state: { modeId: string; loadsOn?: string[] }; model: { sources: { bankId: string }[] } };
    bad.state.modeId = "beach";
    bad.state.loadsOn = ["kettle"];
    const res = handleProjectionRequest(bad);
    expect(res.status).toBe(400);
    if (res.status === 400) expect(res.body.issues.map((i) => i.path.join("."))).toEqual(["state.modeId", "state.loadsOn.0"]);
    // The fixture is a version-1 export: it is migrated, then checked.
    const bad2 = structuredClone(body) as { model: { sources: { supplyBankId?: string }[] } };
    bad2.model.sources[1]!.supplyBankId = "nowhere";
    const res2 = handleProjectionRequest(bad2);
    expect(res2.status).toBe(400);
    if (res2.status === 400) expect(res2.body.issues[0]).toEqual({ path: ["model", "sources", 1, "supplyBankId"], message: 'DC-DC charger draws from unknown bank "nowhere"' });
  });

  it("never throws on junk", () => {
    for (const junk of [undefined, null, 0, "x", [], {}, { model: null, state: null }, { model: body.model, state: {} }]) {
      expect(handleProjectionRequest(junk).status).toBe(400);
    }
  });

  it("converts to JSON Schema", () => {
    const s = projectionRequestJsonSchema() as { type: string; required: string[]; properties: Record<string, { properties?: Record<string, { format?: string }> }> };
    expect(s.type).toBe("object");
    expect(s.required).toEqual(["model", "state"]);
    expect(s.properties.state!.properties!.dateTime!.format).toBe("date-time");
    expect(Object.keys(s.properties.model!.properties!)).toContain("circuits");
  });
});

describe("POST /api/v1/projection with switch positions (the README's shared-bus request)", () => {
  it("answers the solution, the findings and the operations for the positions given", async () => {
    const req = (await import("../../tests/fixtures/projection-request-shared-bus.json")).default;
    const res = handleProjectionRequest(structuredClone(req));
    expect(res.status).toBe(200);
    if (res.status !== 200) return;
    expect(res.body.schemaVersion).toBe(2);
    expect(res.body.solution.positions.find((p) => p.switchId === "sw-crit")).toMatchObject({ position: "charge", origin: "set" });
    expect(res.body.solution.bms.find((b) => b.bankId === "bat-a")!.stateId).toBe("asleep");
    expect(res.body.audit.findings.map((f) => f.kind)).toContain("outside-protection");
    expect(res.body.audit.findings.some((f) => f.kind === "backdoor-charging")).toBe(false);
    expect(res.body.operations.find((o) => o.loadId === "lights")!.allOff!.operationCount).toBe(2); // changeover off → charge, lights switch
    const onLoad = handleProjectionRequest({ ...structuredClone(req), state: { ...req.state, switchPositions: { "sw-crit": "load" } } });
    if (onLoad.status === 200) expect(onLoad.body.audit.findings[0]!.kind).toBe("backdoor-charging");
    else throw new Error("400");
  });
});

describe("present power in the API answer", () => {
  it("Juniper at 19:30 in Parked night draws 145.0 W from the house bank (worked by hand)", async () => {
    const { juniperModel } = await import("../../tests/fixtures/juniper");
    const res = handleProjectionRequest({ model: juniperModel, state: { dateTime: "2026-10-15T19:30:00-06:00", modeId: "parked-night", banks: [{ bankId: "house", socPct: 70 }] }, options: { includeCurves: false } });
    if (res.status !== 200) throw new Error("400");
    const house = res.body.present.find((p) => p.bankId === "house")!;
    // Running at 19:30: fridge 48 W × 35 % = 16.8, lights 24 (18–23 h), dish 75 (19–20 h);
    // spread over the day: pump 64 W × 0.3 h / 24 = 0.8, alarm 0.5; standby: guard engaged 4.8,
    // inverter idle 18, dish 6 W × 19 h / 24 = 4.75, fan 0.3 × 20 / 24 = 0.25, heater 0.2 × 15 / 24 = 0.125.
    expect(house.drawW).toBeCloseTo(16.8 + 24 + 75 + 0.8 + 0.5 + 4.8 + 18 + 4.75 + 0.25 + 0.125, 6);
    expect(house.solarW).toBe(0); // after sunset
  });
});
