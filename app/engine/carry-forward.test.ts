import { describe, expect, it } from "vitest";
import { buildCircuitGraph } from "./circuit-graph";
import { runProjection } from "./projection";
import { oneLoadRig } from "./test-rigs";

// One 64 W load on a 100 Ah, 12.8 V LiFePO4 bank (1,280 Wh), floor 20 %, no sources, η = 1:
// 64 W is 5 % of the bank per hour (worked by hand).
const m = oneLoadRig({ loadW: 64 });
const g = buildCircuitGraph(m);
const now = "2026-10-15T19:30:00-06:00";

describe("SoC carried forward from when it was read", () => {
  it("an SoC of 100 % read 8 h ago is 60 % now, and the runway is what is left (16 − 8 = 8 h)", () => {
    const p = runProjection(m, g, { dateTime: now, modeId: "m", banks: [{ bankId: "b", socPct: 100, takenAt: "2026-10-15T11:30:00-06:00" }] });
    const b = p.banks[0]!;
    expect(b.startSocFrom).toBe("carried");
    expect(b.carriedFrom).toEqual({ takenAt: "2026-10-15T11:30:00-06:00", socPct: 100, segments: 1 });
    expect(b.startSocPct).toBeCloseTo(60, 6);
    expect(b.runwayH).toBeCloseTo(8, 6);
  });

  it("with the switch history: the load switched off after 4 h leaves 80 % now", () => {
    const p = runProjection(m, g, {
      dateTime: now, modeId: "m",
      banks: [{ bankId: "b", socPct: 100, takenAt: "2026-10-15T11:30:00-06:00" }],
      history: [{ at: "2026-10-15T15:30:00-06:00", loadsOn: [] }],
    });
    expect(p.banks[0]!.startSocPct).toBeCloseTo(80, 6);
    expect(p.banks[0]!.carriedFrom!.segments).toBe(2);
  });

  it("a reading from a minute ago is used as it is", () => {
    const p = runProjection(m, g, { dateTime: now, modeId: "m", banks: [{ bankId: "b", socPct: 70, takenAt: "2026-10-15T19:29:00-06:00" }] });
    expect(p.banks[0]!.startSocPct).toBe(70);
    expect(p.banks[0]!.startSocFrom).toBe("soc");
  });
});
