/**
 * Small rigs for the engine's own tests (not shipped as demo data): one bank, one load.
 */
import type { RigModel } from "./model";

export function oneLoadRig(opts: { loadW: number; floorPct?: number; shoreA?: number; chargeEfficiencyPct?: number; solarWp?: number; chemistry?: "lifepo4" | "flooded" }): RigModel {
  const lead = opts.chemistry === "flooded";
  return {
    schemaVersion: 2,
    id: "bench-rig",
    name: "Test rig",
    home: { latDeg: 38.5, lonDeg: -109.6 },
    timeZone: "America/Denver",
    banks: [{
      id: "b", name: "Bank", role: "house", chemistry: opts.chemistry ?? "lifepo4", ratedAh: 100,
      batteryNominalV: lead ? 12 : 12.8, seriesCount: 1, parallelCount: 1,
      usableFloorSocPct: opts.floorPct ?? 20, lowVoltageCutoffV: lead ? 11.5 : 10, peukertExponent: lead ? 1.25 : 1,
      chargeEfficiencyPct: opts.chargeEfficiencyPct ?? 100,
      ports: [{ id: "main", name: "Main", role: "common", lowVoltageProtected: true, chargeProtected: !lead, contactor: false }],
    }],
    sources: [
      ...(opts.shoreA ? [{ id: "shore", name: "Shore", kind: "shore" as const, ratedA: opts.shoreA }] : []),
      ...(opts.solarWp ? [{ id: "pv", name: "PV", kind: "solar" as const, peakW: opts.solarWp, tiltDeg: 0, azimuthDeg: 180, controller: "mppt" as const }] : []),
    ],
    inverters: [],
    buses: [{ id: "bus", name: "Bus", current: "dc" }],
    switches: [],
    protections: [],
    circuits: [
      { id: "c1", name: "Feed", from: { kind: "bank", id: "b", port: "main" }, to: { kind: "bus", id: "bus" }, switches: [], criticality: "critical" },
      ...(opts.shoreA ? [{ id: "c-shore", name: "Shore charger output", from: { kind: "source" as const, id: "shore" }, to: { kind: "bank" as const, id: "b", port: "main" }, switches: [], criticality: "normal" as const }] : []),
      ...(opts.solarWp ? [{ id: "c-pv", name: "PV output", from: { kind: "source" as const, id: "pv" }, to: { kind: "bank" as const, id: "b", port: "main" }, switches: [], criticality: "normal" as const }] : []),
      { id: "c2", name: "Load", from: { kind: "bus", id: "bus" }, to: { kind: "load", id: "l" }, switches: [], criticality: "normal" },
    ],
    loads: [{ id: "l", name: "Load", current: "dc", powerW: opts.loadW, essential: false }],
    modes: [{
      id: "m", name: "Mode", loads: [{ loadId: "l", hoursPerDay: 24 }], inverterIdsOn: [],
      sources: opts.shoreA ? [{ sourceId: "shore", enabled: true }] : [],
    }],
  };
}
