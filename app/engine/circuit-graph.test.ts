import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { buildCircuitGraph, circuitGraphFor } from "./circuit-graph";

const g = buildCircuitGraph(juniperModel);

describe("circuit graph of Juniper", () => {
  it("the induction hob's switch path runs bank → inverter → AC breakers, in order", () => {
    const hob = g.loads.hob!;
    expect(hob.switchPath.map((s) => `${s.name}:${s.position}`)).toEqual([
      "Main disconnect:on", "Inverter power:on", "AC main breaker 20 A:closed", "Hob breaker 15 A:closed",
    ]);
    // Version 2: the bank load enable is a BMS control, not a device in the circuit.
    expect(hob.switchCount).toBe(4);
    expect(hob.primary?.via.map((v) => v.name)).toEqual(["House bus", "Inverter 2000 W", "AC outlets"]);
    expect(hob.forcesStandby.map((f) => f.kind)).toEqual(["contactor", "inverter"]);
    expect(hob.outsideLowVoltageProtection).toBe(false);
  });

  it("the cab sockets follow the changeover switch", () => {
    const laptop = g.loads.laptop!;
    expect(laptop.bankPaths).toHaveLength(2);
    expect(laptop.bankId).toBe("house");
    expect(laptop.switchPath.find((s) => s.kind === "changeover")?.position).toBe("house");
    // In its normal position (house) the laptop is behind the house bank's protection; only the
    // starter position, which has none, puts it outside.
    expect(laptop.outsideLowVoltageProtection).toBe(false);
    const onStarter = buildCircuitGraph(juniperModel, { "sw-cab": "starter" }).loads.laptop!;
    expect(onStarter.outsideLowVoltageProtection).toBe(true);
    expect(onStarter.drainsBankIds).toEqual(["starter"]);
    expect(onStarter.bankId).toBe("starter");
    expect(onStarter.switchPath.map((s) => `${s.name}:${s.position}`)).toEqual(["Cab sockets changeover:starter", "USB-C socket switch:on"]);
    expect(onStarter.forcesStandby).toEqual([]);
  });

  it("a load on the BMS charge port stays live without the contactor but bypasses the cutoff", () => {
    const heater = g.loads["heater-fan"]!;
    expect(heater.primary?.supply).toEqual({ kind: "bank", bankId: "house", portId: "charge" });
    expect(heater.forcesStandby).toEqual([]);
    expect(heater.outsideLowVoltageProtection).toBe(true);
    expect(heater.drainsBankIds).toEqual(["house"]);
    expect(heater.sourcePaths).toHaveLength(3); // solar, DC-DC, shore charger on the charge bus
    const fridge = g.loads.fridge!;
    expect(fridge.outsideLowVoltageProtection).toBe(false);
    expect(fridge.forcesStandby).toEqual([{ kind: "contactor", id: "house", name: "House bank load contactor", w: 4.2 }]);
  });

  it("lists which loads each circuit can feed", () => {
    expect(g.loadsByCircuit["c-cab-starter"]).toEqual(["laptop"]);
    expect(g.loadsByCircuit["c-house-load"]!.sort()).toEqual(["fridge", "hob", "laptop", "lights", "roof-fan", "sat-dish", "water-pump"]);
    expect(g.inverters.inverter).toMatchObject({ bankId: "house", needsContactor: true, lowVoltageProtected: true });
  });

  it("rejects a model with a loop, naming the parts", () => {
    const doc = structuredClone(juniperModel);
    doc.circuits.push({ id: "x", name: "Back feed", from: { kind: "bus", id: "cab-bus" }, to: { kind: "bus", id: "fuse-panel" }, switches: [], criticality: "normal" });
    const res = circuitGraphFor(doc);
    expect(res.ok).toBe(false);
    if (!res.ok) expect(res.issues.some((i) => /Wiring loop: .*Fuse panel.*Cab sockets bus/.test(i.message))).toBe(true);
  });
});
