/**
 * Bank capacity from the logbook: count amp-hours between two trusted SoC points.
 * Trusted points are full charges (charger reached float / absorption ended) and resting
 * voltages that the chemistry can read with high or medium confidence; a monitor's SoC is not
 * trusted, since it is computed from the capacity it was told.
 */
import type { Bank } from "./model";
import { bankCapacityAh, bankChargeEfficiency, socFromRestingVoltage } from "./battery";
import { how, r, type How } from "./explain";

export interface LogReading {
  atMs: number;
  /** Bank current, positive charging, negative discharging. */
  currentA?: number;
  socPct?: number;
  restingV?: number;
  /** The charger ended its absorption: the bank is full. */
  fullCharge?: boolean;
}

export interface CapacityEstimate {
  ok: boolean;
  capacityAh: number | null;
  /** As a share of the bank's rated capacity. */
  healthPct: number | null;
  fromMs: number | null;
  toMs: number | null;
  socFromPct: number | null;
  socToPct: number | null;
  countedAh: number | null;
  confidence: "high" | "medium" | "low";
  note: string;
  how: How;
}

interface TrustedPoint { i: number; atMs: number; socPct: number; kind: "full" | "resting" }

export function estimateCapacity(bank: Bank, readings: LogReading[]): CapacityEstimate {
  const rs = [...readings].filter((x) => Number.isFinite(x.atMs)).sort((a, b) => a.atMs - b.atMs);
  const trusted: TrustedPoint[] = [];
  rs.forEach((x, i) => {
    if (x.fullCharge) trusted.push({ i, atMs: x.atMs, socPct: 100, kind: "full" });
    else if (x.restingV !== undefined) {
      const s = socFromRestingVoltage(bank, x.restingV);
      if (s.confidence !== "low") trusted.push({ i, atMs: x.atMs, socPct: s.socPct, kind: "resting" });
    }
  });
  const none = (note: string): CapacityEstimate => ({
    ok: false, capacityAh: null, healthPct: null, fromMs: null, toMs: null, socFromPct: null, socToPct: null, countedAh: null,
    confidence: "low", note, how: how("C = |Σ I·Δt| / (|ΔSoC| / 100)", { trustedPoints: trusted.length, readings: rs.length }),
  });
  const eff = bankChargeEfficiency(bank);
  let best: { a: TrustedPoint; b: TrustedPoint; ah: number; maxGapMin: number } | null = null;
  for (let x = 0; x < trusted.length; x++) {
    for (let y = x + 1; y < trusted.length; y++) {
      const a = trusted[x]!, b = trusted[y]!;
      const dSoc = Math.abs(b.socPct - a.socPct);
      if (dSoc < 20) continue;
      let ah = 0;
      let maxGapMin = 0;
      let missing = false;
      for (let k = a.i; k < b.i; k++) {
        const p = rs[k]!, q = rs[k + 1]!;
        if (p.currentA === undefined || q.currentA === undefined) { missing = true; break; }
        const dtH = (q.atMs - p.atMs) / 3600000;
        maxGapMin = Math.max(maxGapMin, dtH * 60);
        const mean = (p.currentA + q.currentA) / 2;
        ah += mean > 0 ? mean * eff * dtH : mean * dtH; // charge counted through the charge efficiency
      }
      if (missing) continue;
      if (!best || dSoc > Math.abs(best.b.socPct - best.a.socPct)) best = { a, b, ah, maxGapMin };
    }
  }
  if (!best) return none("Need two trusted SoC points at least 20 % apart (a full charge or a resting voltage) with currents logged in between.");
  const dSoc = best.b.socPct - best.a.socPct;
  // The counted charge must move in the same direction as the SoC change.
  if (Math.sign(best.ah) !== Math.sign(dSoc) || best.ah === 0) {
    return none("The logged current does not match the change in SoC between the trusted points; check the shunt's sign.");
  }
  const capacityAh = Math.abs(best.ah) / (Math.abs(dSoc) / 100);
  const rated = bankCapacityAh({ ...bank, healthPct: 100 });
  const confidence = Math.abs(dSoc) >= 50 && best.maxGapMin <= 15 ? "high" : Math.abs(dSoc) >= 30 && best.maxGapMin <= 60 ? "medium" : "low";
  return {
    ok: true,
    capacityAh,
    healthPct: (100 * capacityAh) / rated,
    fromMs: best.a.atMs,
    toMs: best.b.atMs,
    socFromPct: best.a.socPct,
    socToPct: best.b.socPct,
    countedAh: best.ah,
    confidence,
    note: `Counted ${r(Math.abs(best.ah), 1)} Ah between ${best.a.kind === "full" ? "a full charge" : "a resting voltage"} at ${r(best.a.socPct, 0)} % and ${best.b.kind === "full" ? "a full charge" : "a resting voltage"} at ${r(best.b.socPct, 0)} %; longest gap between readings ${r(best.maxGapMin, 0)} min. Resting-voltage SoC carries its table's uncertainty.`,
    how: how("C = |Σ I·Δt| / (|ΔSoC| / 100), charge counted × η", {
      countedAh: r(best.ah, 2), socFromPct: r(best.a.socPct, 1), socToPct: r(best.b.socPct, 1), chargeEfficiency: eff,
    }),
  };
}
