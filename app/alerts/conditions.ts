/**
 * Which alert conditions hold for a rig now: pure, from the rig's model, shared state, recent
 * logbook readings and rules. The runway comes from the engine's projection (through the Now
 * screen's bridge, `computeNow`), projected forward from the newest SoC (a logbook reading or
 * the shared state's entry, whichever is newer) with the switches that are on.
 */
import { computeNow, graphFor, primaryBank, placeOf, toEngineState } from "~/components/now/now-model";
import { runProjection, type Projection } from "~/engine/projection";
import { bankNominalV } from "~/engine/battery";
import type { RigModel } from "~/engine/model";
import { sunPosition } from "~/engine/solar";
import type { RigState } from "~/schemas/rig-state";
import { defaultVoltageThreshold, type RigRules, type RuleKind } from "./rules";

export type RecentReading = { takenAtMs: number; socPct: number | null; bankVoltageV: number | null; currentA: number | null };

export type ConditionDetail = {
  /** Hours of runway left now (null: beyond the projection's horizon). */
  runwayH?: number | null;
  /** When the bank is expected to reach its cutoff or floor (epoch ms), if within the horizon. */
  cutoffAtMs?: number | null;
  socPct?: number;
  floorPct?: number;
  voltageV?: number;
  thresholdV?: number;
  thresholdH?: number;
  lastReadingAtMs?: number | null;
  expectedNetA?: number;
  measuredA?: number;
  nextChargeAtMs?: number | null;
  nextChargeKind?: string | null;
};

export type Condition = { rule: RuleKind; active: boolean; detail: ConditionDetail };

export type RigSnapshot = {
  model: RigModel;
  state: RigState;
  /** Newest first; the last day or so is plenty. */
  readings: RecentReading[];
  rules: RigRules;
  nowMs: number;
};

/** A reading this old no longer describes the bank "now" for the voltage and charging rules. */
const FRESH_MS = 60 * 60_000;

/** The state with the newest SoC we know (a device or hand reading may be newer than the shared entry). */
export function withNewestSoc(state: RigState, readings: RecentReading[]): { state: RigState; socAtMs: number | null } {
  const fromReading = readings.find((r) => r.socPct !== null);
  const entryMs = state.soc ? Date.parse(state.soc.takenAt) : null;
  if (fromReading && (entryMs === null || fromReading.takenAtMs > entryMs)) {
    return {
      state: { ...state, soc: { socPct: fromReading.socPct!, source: "logbook", takenAt: new Date(fromReading.takenAtMs).toISOString() } },
      socAtMs: fromReading.takenAtMs,
    };
  }
  return { state, socAtMs: entryMs };
}

/**
 * The alert pass projects 36 h in 15-minute steps (the Now screen uses 72 h in 5-minute steps):
 * enough to reach the next charge, six times less work for the schedule's sweep of every rig.
 */
export const ALERT_PROJECTION = { horizonH: 36, stepMin: 15 } as const;

function project(model: RigModel, state: RigState, atMs: number): Projection {
  return runProjection(model, graphFor(model, state.positions), toEngineState(model, state, atMs), ALERT_PROJECTION);
}

export function evaluateConditions(snap: RigSnapshot): { conditions: Condition[]; projection: Projection | null } {
  const { model, rules, nowMs, readings } = snap;
  const bank = primaryBank(model);
  const { state, socAtMs } = withNewestSoc(snap.state, readings);
  const conditions: Condition[] = [];
  const latest = readings[0] ?? null;
  const fresh = latest && nowMs - latest.takenAtMs <= FRESH_MS ? latest : null;

  // The projection from the moment of the newest SoC, so the runway runs down between readings.
  // With a switch history in between (state.history), the projection starts now instead and the
  // engine carries the SoC forward through what was on then (../engine/carry-forward).
  const fromSoc = socAtMs !== null && socAtMs <= nowMs && nowMs - socAtMs < 48 * 3_600_000 ? socAtMs : nowMs;
  const throughHistory = fromSoc < nowMs && (state.history ?? []).some((h) => Date.parse(h.at) > fromSoc && Date.parse(h.at) <= nowMs);
  const startMs = throughHistory ? nowMs : fromSoc;
  const projection = state.soc ? project(model, state, startMs) : null;
  const pBank = projection ? projection.banks.find((b) => b.bankId === projection.primaryBankId) ?? null : null;
  const elapsedH = (nowMs - startMs) / 3_600_000;

  if (projection && pBank) {
    const runwayH = pBank.runwayH === null ? null : Math.max(0, pBank.runwayH - elapsedH);
    const cutoffAtMs = runwayH === null ? null : nowMs + runwayH * 3_600_000;
    if (rules.runway_low.enabled) {
      conditions.push({ rule: "runway_low", active: runwayH !== null && runwayH < rules.runway_low.belowH, detail: { runwayH, cutoffAtMs, thresholdH: rules.runway_low.belowH } });
    }
    const p = projection;
    const i = Math.min(p.timesMs.length - 1, Math.max(0, Math.round((elapsedH * 60) / p.stepMin)));
    const socNow = pBank.socPct[i]!;
    if (rules.soc_low.enabled) {
      const floorPct = rules.soc_low.floorPct ?? bank.usableFloorSocPct;
      conditions.push({ rule: "soc_low", active: socNow < floorPct, detail: { socPct: socNow, floorPct, runwayH, cutoffAtMs } });
    }
    if (rules.falls_short.enabled) {
      const td = pBank.tillDawn;
      conditions.push({
        rule: "falls_short",
        active: td.nextWindowMs !== null && !td.reaches,
        detail: { runwayH, cutoffAtMs, nextChargeAtMs: td.nextWindowMs, nextChargeKind: td.nextWindowKind },
      });
    }
  }

  if (rules.voltage_low.enabled) {
    const thresholdV = rules.voltage_low.belowV ?? defaultVoltageThreshold(bankNominalV(bank));
    const v = fresh?.bankVoltageV ?? null;
    conditions.push({ rule: "voltage_low", active: v !== null && v < thresholdV, detail: { ...(v !== null ? { voltageV: v } : {}), thresholdV } });
  }

  if (rules.no_reading.enabled) {
    const parked = rules.no_reading.parkedModeIds.length === 0 || rules.no_reading.parkedModeIds.includes(state.modeId ?? model.modes[0]?.id ?? "");
    const lastMs = latest?.takenAtMs ?? null;
    const stale = lastMs !== null && nowMs - lastMs > rules.no_reading.afterH * 3_600_000;
    conditions.push({ rule: "no_reading", active: parked && stale, detail: { lastReadingAtMs: lastMs, thresholdH: rules.no_reading.afterH } });
  }

  if (rules.charging_stopped.enabled) {
    // Unexpected: the sun is up, the engine expects the bank to be charging at least 1 A net
    // right now, and a fresh reading shows no charge current at all.
    const place = placeOf(model, state);
    const measured = fresh?.currentA ?? null;
    // The engine's present power only when it can matter (sun up, a fresh reading without charge).
    const sunUp = measured !== null && measured <= 0 && sunPosition(nowMs, place.latDeg, place.lonDeg).elevationDeg > 10;
    const expected = sunUp && state.soc ? computeNow({ model, state, atMs: nowMs }).present : null;
    const active = expected !== null && expected.netA >= 1 && expected.solarW > 0;
    conditions.push({
      rule: "charging_stopped",
      active,
      detail: { ...(expected ? { expectedNetA: expected.netA } : {}), ...(measured !== null ? { measuredA: measured } : {}) },
    });
  }
  return { conditions, projection };
}
