// Version 1 → 2: every stored version-1 document of the demo and the fixtures migrates and gives
// the same runway and budget as before. The "before" figures in tests/fixtures/v1/figures.json
// were produced by the version-1 engine (commit 17b3d80) from the version-1 documents kept in
// tests/fixtures/v1/ and the version-1 test rigs (state: 2026-10-15 19:30 −06:00, every bank at
// 70 %, weather 0.8). None of these rigs parallels banks on one bus, so nothing may move.
import figures from "../../tests/fixtures/v1/figures.json";
import juniperV1 from "../../tests/fixtures/v1/juniper.json";
import largeV1 from "../../tests/fixtures/v1/large-rig.json";
import { describe, expect, it } from "vitest";
import { buildCircuitGraph } from "./circuit-graph";
import { computeBudget } from "./draw";
import { migrateModel, validateModel, type RigModel } from "./model";
import { runProjection } from "./projection";

const files: Record<string, unknown> = { "juniper.json": juniperV1, "large-rig.json": largeV1, "figures.json": figures };
const read = (f: string) => structuredClone(files[f]) as Record<string, unknown>;
type Figures = Record<string, { totalWhPerDay: number; standbyWhPerDay: number; banks: Record<string, number>; runwayH: Record<string, number | null>; endSoc: Record<string, number> }>;
const before = read("figures.json") as unknown as Record<string, Figures>;

// The version-1 test rigs as they were stored (one bank, a source with a bankId shortcut).
function oneLoadV1(loadW: number, opts: { solarWp?: number; shoreA?: number; flooded?: boolean }) {
  const lead = !!opts.flooded;
  return {
    schemaVersion: 1, id: "bench-rig", name: "Test rig", home: { latDeg: 38.5, lonDeg: -109.6 }, timeZone: "America/Denver",
    banks: [{ id: "b", name: "Bank", role: "house", chemistry: lead ? "flooded" : "lifepo4", ratedAh: 100, batteryNominalV: lead ? 12 : 12.8, seriesCount: 1, parallelCount: 1, usableFloorSocPct: 20, lowVoltageCutoffV: lead ? 11.5 : 10, peukertExponent: lead ? 1.25 : 1, chargeEfficiencyPct: 100, standbyAlwaysW: 0, standbyContactorW: 0, ports: [{ id: "main", name: "Main", role: "common", lowVoltageProtected: true, contactor: false }] }],
    sources: [
      ...(opts.shoreA ? [{ id: "shore", name: "Shore", kind: "shore", bankId: "b", ratedA: opts.shoreA }] : []),
      ...(opts.solarWp ? [{ id: "pv", name: "PV", kind: "solar", bankId: "b", peakW: opts.solarWp, tiltDeg: 0, azimuthDeg: 180, controller: "mppt" }] : []),
    ],
    inverters: [], buses: [{ id: "bus", name: "Bus", current: "dc" }], switches: [], protections: [],
    circuits: [
      { id: "c1", name: "Feed", from: { kind: "bank", id: "b", port: "main" }, to: { kind: "bus", id: "bus" }, switches: [], criticality: "critical" },
      { id: "c2", name: "Load", from: { kind: "bus", id: "bus" }, to: { kind: "load", id: "l" }, switches: [], criticality: "normal" },
    ],
    loads: [{ id: "l", name: "Load", current: "dc", powerW: loadW, essential: false }],
    modes: [{ id: "m", name: "Mode", loads: [{ loadId: "l", hoursPerDay: 24 }], inverterIdsOn: [], sources: opts.shoreA ? [{ sourceId: "shore", enabled: true }] : [] }],
  };
}

const docs: Record<string, unknown> = {
  juniper: read("juniper.json"),
  large: read("large-rig.json"),
  oneLoad: oneLoadV1(60, { solarWp: 200 }),
  oneLoadShore: oneLoadV1(100, { shoreA: 5, flooded: true }),
};

describe("model migration 1 → 2", () => {
  for (const [name, doc] of Object.entries(docs)) {
    it(`${name}: migrates, validates and keeps its budget and runway in every mode`, () => {
      const migrated = migrateModel(doc) as RigModel;
      expect(migrated.schemaVersion).toBe(2);
      const v = validateModel(doc);
      if (!v.ok) throw new Error(JSON.stringify(v.issues.slice(0, 3)));
      const m = v.model;
      const g = buildCircuitGraph(m);
      for (const [modeId, f] of Object.entries(before[name]!)) {
        const b = computeBudget(m, g, { modeId });
        expect(b.totalWhPerDay).toBeCloseTo(f.totalWhPerDay, 6);
        expect(b.standbyWhPerDay).toBeCloseTo(f.standbyWhPerDay, 6);
        for (const [bankId, wh] of Object.entries(f.banks)) expect(b.banks.find((x) => x.bankId === bankId)!.whPerDay).toBeCloseTo(wh, 6);
        const p = runProjection(m, g, { dateTime: "2026-10-15T19:30:00-06:00", modeId, banks: m.banks.map((x) => ({ bankId: x.id, socPct: 70 })), weatherFactor: 0.8 });
        for (const [bankId, h] of Object.entries(f.runwayH)) {
          const got = p.banks.find((x) => x.bankId === bankId)!.runwayH;
          if (h === null) expect(got).toBeNull();
          else expect(got!).toBeCloseTo(h, 6);
        }
        for (const [bankId, s] of Object.entries(f.endSoc)) expect(p.banks.find((x) => x.bankId === bankId)!.endSocPct).toBeCloseTo(s, 6);
      }
    });
  }

  it("the v1 source shortcut becomes a circuit to the bank's charge port; standby becomes BMS states", () => {
    const m = migrateModel(oneLoadV1(60, { shoreA: 5 })) as RigModel;
    expect(m.circuits.find((c) => c.from.kind === "source")).toMatchObject({ from: { kind: "source", id: "shore" }, to: { kind: "bank", id: "b", port: "main" } });
    const j = migrateModel(read("juniper.json")) as RigModel;
    const house = j.banks.find((b) => b.id === "house")!;
    expect(house.bms!.states.map((s) => [s.id, s.standbyW, s.livePorts])).toEqual([["on", 0.6, ["charge"]], ["engaged", 4.8, ["load", "charge"]]]);
    // The enable that used to sit in the load feed now drives the engaged state.
    expect(house.bms!.states[1]!.requires).toEqual([{ switchId: "sw-bank-enable", position: "on" }]);
    expect(j.circuits.find((c) => c.id === "c-house-load")!.switches.map((s) => s.switchId)).toEqual(["sw-main"]);
    expect(j.switches.find((s) => s.id === "sw-cab")!.normalPosition).toBe("house");
  });

  it("the demo fixture in the repository is the migrated version-1 demo", () => {
    return import("../../tests/fixtures/juniper").then(({ juniperModel }) => {
      const migrated = migrateModel(read("juniper.json")) as RigModel;
      const names = (x: RigModel) => ({ ...x, banks: x.banks.map((b) => ({ ...b, bms: b.bms ? { ...b.bms, name: "" } : undefined })) });
      expect(JSON.parse(JSON.stringify(names(juniperModel)))).toEqual(JSON.parse(JSON.stringify(names(migrated))));
    });
  });
});
