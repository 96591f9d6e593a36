import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { runAudit } from "./audit";
import { buildCircuitGraph } from "./circuit-graph";

describe("wiring audit of Juniper", () => {
  const audit = runAudit(juniperModel, buildCircuitGraph(juniperModel));
  const c = (id: string) => audit.circuits.find((x) => x.circuitId === id)!;

  it("passes as built", () => {
    expect(audit.failures).toEqual([]);
    expect(audit.caution).toMatch(/ABYC E-11/);
  });

  it("sizes the fridge circuit (worked example, ours)", () => {
    // 48 W / 12.8 V = 3.75 A, 24 h/day → continuous: fuse ≥ 1.25 × 3.75 = 4.69 A (10 A fitted).
    // Drop: 12 AWG at 30 °C = 1.98/304.8 × (1 − 0.00323 × 45) = 5.552 mΩ/m × 6 m × 3.75 A = 0.1249 V = 0.976 % of 12.8 V.
    expect(c("c-fridge").designA).toBeCloseTo(3.75, 9);
    expect(c("c-fridge").protection!.requiredMinA).toBeCloseTo(4.6875, 9);
    expect(c("c-fridge").cable!.drop.dropPct).toBeCloseTo(0.976, 2);
    expect(c("c-fridge").cable!.drop.limitPct).toBe(3);
  });

  it("rates the inverter feed at the inverter's full DC draw", () => {
    // 2,000 W / 0.90 / 12.8 V = 173.6 A continuous → ≥ 217 A device; ANL 250 A on 2/0 AWG at 105 °C (330 A).
    expect(c("c-inverter").designA).toBeCloseTo(173.61, 2);
    expect(c("c-inverter").protection!.coversLoad).toBe(true);
    expect(c("c-inverter").cable!.ampacityA).toBe(330);
  });

  it("lists loads that can drain a bank past its cutoff", () => {
    // In the present positions only: the cab changeover stands on "house", so the laptop is protected.
    expect(audit.outsideLowVoltageProtection.map((x) => x.loadId).sort()).toEqual(["co-alarm", "heater-fan"]);
    const onStarter = runAudit(juniperModel, buildCircuitGraph(juniperModel, { "sw-cab": "starter" }), { modeId: "parked-night" });
    expect(onStarter.outsideLowVoltageProtection.map((x) => x.loadId).sort()).toEqual(["co-alarm", "heater-fan", "laptop"]);
  });

  it("flags an undersized fuse and a long thin run", () => {
    const draft = structuredClone(juniperModel);
    draft.protections.find((p) => p.id === "f-fridge")!.ratingA = 3;
    draft.circuits.find((x) => x.id === "c-lights")!.cable!.lengthM = 30;
    const a = runAudit(draft, buildCircuitGraph(draft));
    const msgs = a.failures.map((f) => `${f.circuitId}: ${f.message}`).join("\n");
    expect(msgs).toMatch(/c-fridge: Fridge fuse 10 A is below the 4.7 A/);
    expect(msgs).toMatch(/c-lights: Voltage drop .* exceeds 10 %/);
  });
});
