/**
 * Property-based checks (fast-check) over random valid rigs and states.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { handleProjectionRequest } from "./api-test-helper";
import { buildCircuitGraph } from "./circuit-graph";
import { validateModel, type Chemistry, type RigModel } from "./model";
import { runProjection } from "./projection";
import type { CurrentState } from "./state";

interface Params {
  chemistry: Chemistry;
  ratedAh: number;
  parallel: number;
  series: number;
  floorPct: number;
  loads: { w: number; hours: number; window: [number, number] | null; ac: boolean; standbyW: number }[];
  solarWp: number;
  tiltDeg: number;
  azimuthDeg: number;
  tempCoeff: number;
  shore: [number, number] | null;
  socPct: number;
  ms: number;
  latDeg: number;
  lonDeg: number;
  weather: number;
}

const params: fc.Arbitrary<Params> = fc.record({
  chemistry: fc.constantFrom<Chemistry>("lifepo4", "agm", "flooded", "gel"),
  ratedAh: fc.integer({ min: 20, max: 400 }),
  parallel: fc.integer({ min: 1, max: 3 }),
  series: fc.integer({ min: 1, max: 4 }),
  floorPct: fc.integer({ min: 0, max: 80 }),
  loads: fc.array(
    fc.record({
      w: fc.double({ min: 0, max: 600, noNaN: true }),
      hours: fc.double({ min: 0, max: 24, noNaN: true }),
      window: fc.option(fc.tuple(fc.integer({ min: 0, max: 23 }), fc.integer({ min: 0, max: 24 })), { nil: null }),
      ac: fc.boolean(),
      standbyW: fc.double({ min: 0, max: 10, noNaN: true }),
    }),
    { minLength: 1, maxLength: 5 },
  ),
  solarWp: fc.integer({ min: 0, max: 1200 }),
  tiltDeg: fc.integer({ min: 0, max: 90 }),
  azimuthDeg: fc.integer({ min: 0, max: 360 }),
  tempCoeff: fc.double({ min: -0.5, max: 0, noNaN: true }),
  shore: fc.option(fc.tuple(fc.integer({ min: 0, max: 23 }), fc.integer({ min: 1, max: 24 })), { nil: null }),
  socPct: fc.double({ min: 0, max: 100, noNaN: true }),
  ms: fc.integer({ min: Date.UTC(2020, 0, 1), max: Date.UTC(2035, 0, 1) }),
  latDeg: fc.double({ min: -60, max: 65, noNaN: true }),
  lonDeg: fc.double({ min: -180, max: 180, noNaN: true }),
  weather: fc.double({ min: 0, max: 1, noNaN: true }),
});

function buildRig(p: Params, loadScale = 1): RigModel {
  const lead = p.chemistry !== "lifepo4";
  const batteryV = lead ? 12 : 12.8;
  return {
    schemaVersion: 2, id: "prop", name: "Random rig", home: { latDeg: p.latDeg, lonDeg: p.lonDeg }, timeZone: "UTC",
    banks: [{
      id: "b", name: "Bank", role: "house", chemistry: p.chemistry, ratedAh: p.ratedAh, batteryNominalV: batteryV,
      seriesCount: p.series, parallelCount: p.parallel, usableFloorSocPct: p.floorPct,
      lowVoltageCutoffV: (lead ? 11.5 : 11) * p.series,
      bms: { name: "BMS", states: [{ id: "on", name: "On", standbyW: 0.5, livePorts: ["charge"], requires: [] }, { id: "engaged", name: "Engaged", standbyW: 2.5, livePorts: ["load", "charge"], requires: [{ switchId: "en", position: "on" }] }] },
      ports: [{ id: "load", name: "Load", role: "load", lowVoltageProtected: true, chargeProtected: false, contactor: true }, { id: "charge", name: "Charge", role: "charge", lowVoltageProtected: false, chargeProtected: true, contactor: false }],
    }],
    sources: [
      ...(p.solarWp > 0 ? [{ id: "pv", name: "PV", kind: "solar" as const, peakW: p.solarWp, tiltDeg: p.tiltDeg, azimuthDeg: p.azimuthDeg % 360, controller: "mppt" as const, tempCoeffPctPerC: p.tempCoeff }] : []),
      ...(p.shore ? [{ id: "shore", name: "Shore", kind: "shore" as const, ratedA: 15 }] : []),
    ],
    inverters: [{ id: "inv", name: "Inverter", ratedW: 2000, efficiencyPct: 88, idleW: 15, acNominalV: 230 }],
    buses: [{ id: "dc", name: "DC", current: "dc" }, { id: "ac", name: "AC", current: "ac" }, { id: "cb", name: "Charge bus", current: "dc" }],
    switches: [{ id: "en", name: "BMS enable", kind: "enable", positions: ["off", "on"] }], protections: [],
    circuits: [
      ...(p.solarWp > 0 ? [{ id: "pvc", name: "PV", from: { kind: "source" as const, id: "pv" }, to: { kind: "bank" as const, id: "b", port: "charge" }, switches: [], criticality: "normal" as const }] : []),
      ...(p.shore ? [{ id: "shc", name: "Shore", from: { kind: "source" as const, id: "shore" }, to: { kind: "bank" as const, id: "b", port: "charge" }, switches: [], criticality: "normal" as const }] : []),
      { id: "feed", name: "Feed", from: { kind: "bank", id: "b", port: "load" }, to: { kind: "bus", id: "dc" }, switches: [], criticality: "critical" },
      { id: "cfeed", name: "Charge feed", from: { kind: "bank", id: "b", port: "charge" }, to: { kind: "bus", id: "cb" }, switches: [], criticality: "critical" },
      { id: "invc", name: "Inverter", from: { kind: "bus", id: "dc" }, to: { kind: "inverter", id: "inv" }, switches: [], criticality: "critical" },
      { id: "acout", name: "AC out", from: { kind: "inverter", id: "inv" }, to: { kind: "bus", id: "ac" }, switches: [], criticality: "normal" },
      ...p.loads.map((l, i) => ({ id: `c${i}`, name: `Load ${i}`, from: { kind: "bus" as const, id: l.ac ? "ac" : i % 2 ? "cb" : "dc" }, to: { kind: "load" as const, id: `l${i}` }, switches: [], criticality: "normal" as const })),
    ],
    loads: p.loads.map((l, i) => ({ id: `l${i}`, name: `Load ${i}`, current: l.ac ? "ac" as const : "dc" as const, powerW: l.w * loadScale, standbyW: l.standbyW * loadScale, essential: false })),
    modes: [{
      id: "m", name: "Mode",
      loads: p.loads.map((l, i) => ({ loadId: `l${i}`, hoursPerDay: l.hours, ...(l.window ? { windows: [{ startH: l.window[0], endH: l.window[1] }] } : {}) })),
      inverterIdsOn: [],
      sources: p.shore ? [{ sourceId: "shore", enabled: true, windows: [{ startH: p.shore[0], endH: p.shore[1] }] }] : [],
    }],
  };
}

function stateOf(p: Params, weather = p.weather): CurrentState {
  return { dateTime: new Date(p.ms).toISOString(), modeId: "m", banks: [{ bankId: "b", socPct: p.socPct }], weatherFactor: weather };
}

function project(m: RigModel, s: CurrentState) {
  const v = validateModel(m);
  if (!v.ok) throw new Error(JSON.stringify(v.issues));
  return runProjection(v.model, buildCircuitGraph(v.model), s, { stepMin: 10 }).banks[0]!;
}

const runway = (b: { runwayH: number | null }) => b.runwayH ?? Number.POSITIVE_INFINITY;
const RUNS = 40;

describe("projection properties", () => {
  it("more load never lengthens the runway", () => {
    fc.assert(fc.property(params, fc.double({ min: 1, max: 3, noNaN: true }), (p, k) => {
      const base = project(buildRig(p), stateOf(p));
      const more = project(buildRig(p, k), stateOf(p));
      expect(runway(more)).toBeLessThanOrEqual(runway(base) + 1e-9);
    }), { numRuns: RUNS, seed: 4 });
  });

  it("more sun never shortens the runway", () => {
    fc.assert(fc.property(params, fc.double({ min: 0, max: 1, noNaN: true }), (p, extra) => {
      const w2 = Math.min(1, p.weather + extra);
      const less = project(buildRig(p), stateOf(p, p.weather));
      const more = project(buildRig(p), stateOf(p, w2));
      expect(runway(more)).toBeGreaterThanOrEqual(runway(less) - 1e-9);
    }), { numRuns: RUNS, seed: 5 });
  });

  it("energy balances and every number is finite, SoC within [0, 100], times non-negative", () => {
    fc.assert(fc.property(params, (p) => {
      const b = project(buildRig(p), stateOf(p));
      const e = b.energy;
      const residual = e.storedChangeWh - (e.chargedWh * e.chargeEfficiency - e.drawnWh - e.peukertWh);
      expect(Math.abs(residual)).toBeLessThan(1e-6 * Math.max(1, e.chargedWh + e.drawnWh));
      for (const x of b.socPct) {
        expect(Number.isFinite(x)).toBe(true);
        expect(x).toBeGreaterThanOrEqual(-1e-9);
        expect(x).toBeLessThanOrEqual(100 + 1e-9);
      }
      for (const x of Object.values(e)) expect(Number.isFinite(x)).toBe(true);
      if (b.runwayH !== null) expect(b.runwayH).toBeGreaterThanOrEqual(0);
      if (b.tillDawn.marginSocPct !== null) expect(Number.isFinite(b.tillDawn.marginSocPct)).toBe(true);
      expect(b.minSocPct).toBeGreaterThanOrEqual(Math.min(b.startSocPct, b.stopSocPct) - 1e-9);
    }), { numRuns: RUNS, seed: 6 });
  });
});

describe("invalid models", () => {
  // Put a random value at a random path of the Juniper document.
  const paths: (string | number)[][] = [];
  const walk = (v: unknown, path: (string | number)[]) => {
    paths.push(path);
    if (Array.isArray(v)) v.forEach((x, i) => walk(x, [...path, i]));
    else if (v && typeof v === "object") for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
  };
  walk(juniperModel, []);
  const junk = fc.oneof(fc.constant(null), fc.constant(undefined), fc.integer(), fc.double(), fc.string(), fc.constant([]), fc.constant({}), fc.boolean());

  it("are rejected with paths, never thrown", () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: paths.length - 1 }), junk, (i, value) => {
      const doc = structuredClone(juniperModel) as unknown as Record<string, unknown>;
      const path = paths[i]!;
      let target: Record<string | number, unknown> = doc;
      for (const k of path.slice(0, -1)) target = target[k] as Record<string | number, unknown>;
      target[path[path.length - 1]!] = value;
      const res = validateModel(doc);
      if (!res.ok) {
        expect(res.issues.length).toBeGreaterThan(0);
        for (const issue of res.issues) expect(Array.isArray(issue.path)).toBe(true);
      }
      const api = handleProjectionRequest({ model: doc, state: { dateTime: "2026-10-15T19:30:00Z", modeId: "parked-night", banks: [{ bankId: "house", socPct: 50 }] }, options: { horizonH: 6 } });
      expect([200, 400]).toContain(api.status);
      if (api.status === 400) expect(api.body.issues.every((x) => x.path[0] === "model" || x.path[0] === "state")).toBe(true);
    }), { numRuns: 150, seed: 7 });
  });
});
