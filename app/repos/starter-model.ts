/**
 * The model a newly created rig starts from: one 100 Ah LiFePO4 house bank with a single port,
 * one DC bus fed from it, no loads and one mode. Valid by the engine's schema, so every
 * screen can open it; the owner replaces the placeholders as they record the rig as built.
 */
import { SCHEMA_VERSION, type RigModel } from "~/engine/model";

export function starterModel(input: { name: string; timeZone?: string; latDeg?: number; lonDeg?: number }): RigModel {
  return {
    schemaVersion: SCHEMA_VERSION,
    id: "rig",
    name: input.name,
    home: { latDeg: input.latDeg ?? 0, lonDeg: input.lonDeg ?? 0 },
    timeZone: input.timeZone ?? "UTC",
    banks: [
      {
        id: "house",
        name: "House bank",
        role: "house",
        chemistry: "lifepo4",
        ratedAh: 100,
        batteryNominalV: 12.8,
        seriesCount: 1,
        parallelCount: 1,
        usableFloorSocPct: 15,
        lowVoltageCutoffV: 11.2,
        ports: [{ id: "main", name: "Main", role: "common", lowVoltageProtected: true, chargeProtected: true, contactor: false }],
      },
    ],
    sources: [],
    inverters: [],
    buses: [{ id: "dc-main", name: "Main DC bus", current: "dc" }],
    switches: [],
    protections: [],
    circuits: [
      {
        id: "bank-to-bus",
        name: "House bank to main DC bus",
        from: { kind: "bank", id: "house", port: "main" },
        to: { kind: "bus", id: "dc-main" },
        switches: [],
        criticality: "critical",
      },
    ],
    loads: [],
    modes: [{ id: "everyday", name: "Everyday", loads: [], inverterIdsOn: [], sources: [] }],
  };
}
