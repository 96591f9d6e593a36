import { describe, expect, it } from "vitest";
import { largeRig, LARGE_RIG_COUNTS } from "../../tests/fixtures/large-rig";
import { handleProjectionRequest } from "./api-test-helper";
import { validateModel } from "./model";

describe("the benchmark's large rig", () => {
  it("is a valid model of the stated size and runs end to end", () => {
    const v = validateModel(largeRig());
    if (!v.ok) console.log(v.issues.slice(0, 5));
    expect(v.ok).toBe(true);
    if (!v.ok) return;
    const m = v.model;
    expect({ banks: m.banks.length, sources: m.sources.length, loads: m.loads.length, circuits: m.circuits.length }).toEqual(LARGE_RIG_COUNTS);
    const res = handleProjectionRequest({ model: m, state: { dateTime: "2026-10-15T19:30:00-06:00", modeId: "m-parked", banks: [{ bankId: "house", socPct: 70 }, { bankId: "aux", restingV: 25 }, { bankId: "starter", socPct: 90 }] } });
    expect(res.status).toBe(200);
  });
});
