/**
 * Battery bank arithmetic: capacity, Peukert, charge efficiency, SoC from resting voltage,
 * usable energy down to the usable floor or the low-voltage cutoff.
 */
import type { Bank, Chemistry } from "./model";
import { how, r, type How } from "./explain";
import { clamp, interpolate } from "./units";

export interface ChemistryDefaults {
  /** Peukert exponent. Lead-acid: mid-range of the published typical values (secondary).
   * LiFePO4 capacity barely depends on rate (k ≈ 1.02–1.05, memory): the default is 1 so the
   * engine invents no loss; an owner who knows better sets peukertExponent on the bank. */
  peukertExponent: number;
  /** Charge efficiency, common practice: lead-acid 80–90 %, LiFePO4 95–99 %. */
  chargeEfficiencyPct: number;
  /** Usable floor, common practice: 50 % lead-acid, 10–20 % LiFePO4. */
  usableFloorSocPct: number;
  /** Nominal volts per cell. */
  cellNominalV: number;
  /** Resting-voltage uncertainty per cell (meter, rest time, temperature; for LiFePO4 also
   * the charge/discharge hysteresis of its flat curve). Common practice / memory. */
  restingVoltageUncertaintyVPerCell: number;
}

export const CHEMISTRY_DEFAULTS: Record<Chemistry, ChemistryDefaults> = {
  lifepo4: { peukertExponent: 1, chargeEfficiencyPct: 97, usableFloorSocPct: 15, cellNominalV: 3.2, restingVoltageUncertaintyVPerCell: 0.02 },
  agm: { peukertExponent: 1.1, chargeEfficiencyPct: 88, usableFloorSocPct: 50, cellNominalV: 2, restingVoltageUncertaintyVPerCell: 0.01 },
  gel: { peukertExponent: 1.15, chargeEfficiencyPct: 85, usableFloorSocPct: 50, cellNominalV: 2, restingVoltageUncertaintyVPerCell: 0.01 },
  flooded: { peukertExponent: 1.25, chargeEfficiencyPct: 85, usableFloorSocPct: 50, cellNominalV: 2, restingVoltageUncertaintyVPerCell: 0.01 },
};

export const isLeadAcid = (c: Chemistry): boolean => c !== "lifepo4";

/** Resting (open-circuit) voltage per CELL → SoC %, ascending by voltage. */
export const RESTING_VOLTAGE_TABLES: Record<Chemistry, { table: readonly (readonly [number, number])[]; source: string }> = {
  // Battery Council International table for a 12 V flooded battery at 80 °F, divided by 6
  // cells: 11.89 V 0 %, 12.06 V 25 %, 12.24 V 50 %, 12.45 V 75 %, 12.65 V 100 % (secondary).
  flooded: {
    table: [[11.89 / 6, 0], [12.06 / 6, 25], [12.24 / 6, 50], [12.45 / 6, 75], [12.65 / 6, 100]],
    source: "Battery Council International resting-voltage table, 12 V flooded at 80 °F (secondary)",
  },
  // AGM: linear 11.65 V 0 % … 12.85 V 100 % for a 12 V battery, 2 h at rest (a battery
  // manufacturer's technical note, secondary). Varies by maker.
  agm: {
    table: [[11.65 / 6, 0], [11.95 / 6, 25], [12.25 / 6, 50], [12.55 / 6, 75], [12.85 / 6, 100]],
    source: "AGM resting-voltage table from a manufacturer's technical note (secondary; varies by maker)",
  },
  // Gel: no source at hand; the AGM table shifted 0.05 V lower per 12 V (memory, low weight).
  gel: {
    table: [[11.6 / 6, 0], [11.9 / 6, 25], [12.2 / 6, 50], [12.5 / 6, 75], [12.8 / 6, 100]],
    source: "Gel resting-voltage table (memory; check the maker's data)",
  },
  // LiFePO4 pseudo-OCV per cell. Anchored on two published points (Sunil, Pattipati &
  // Balasingam, IEEE Trans. Instrum. Meas. 2025: SoC 0.2972 → 3.2772 V, 0.9833 → 3.3511 V);
  // the rest is the common shape of the curve (memory): steep below 15 %, flat 20–90 %.
  lifepo4: {
    table: [
      [2.8, 0], [3.0, 4], [3.15, 9], [3.22, 15], [3.25, 20], [3.2772, 29.72], [3.29, 40],
      [3.3, 50], [3.31, 60], [3.32, 70], [3.33, 80], [3.34, 90], [3.3511, 98.33], [3.4, 100],
    ],
    source: "LiFePO4 pseudo-OCV, anchored on Sunil et al. 2025 (published) with a common-practice curve shape",
  },
};

export function bankCellsInSeries(bank: Bank): number {
  const perBattery = Math.max(1, Math.round(bank.batteryNominalV / CHEMISTRY_DEFAULTS[bank.chemistry].cellNominalV));
  return perBattery * bank.seriesCount;
}

export function bankNominalV(bank: Bank): number {
  return bank.batteryNominalV * bank.seriesCount;
}

export function bankPeukertExponent(bank: Bank): number {
  return bank.peukertExponent ?? CHEMISTRY_DEFAULTS[bank.chemistry].peukertExponent;
}

export function bankChargeEfficiency(bank: Bank): number {
  return (bank.chargeEfficiencyPct ?? CHEMISTRY_DEFAULTS[bank.chemistry].chargeEfficiencyPct) / 100;
}

export function bankRatedHourRateH(bank: Bank): number {
  return bank.ratedHourRateH ?? 20;
}

/**
 * Lead-acid capacity vs temperature, as the IEEE 485 Table 1 cell-size correction factors
 * (factor by which a cell must be oversized; capacity ratio = 1 / factor). Values from
 * memory of the table (°F in the standard, converted); cross-checked in the test against the
 * cubic fit of the same table quoted by a secondary source.
 */
const IEEE485_FACTORS_C: readonly (readonly [number, number])[] = [
  [-3.9, 1.52], [-1.1, 1.43], [1.7, 1.35], [4.4, 1.3], [7.2, 1.25], [10, 1.19], [12.8, 1.15],
  [15.6, 1.11], [18.3, 1.08], [21.1, 1.04], [23.9, 1.011], [25, 1.0],
];
// Above 25 °C the two sources at hand disagree by up to 0.05 (memory of the table vs the
// cubic fit), and warm batteries age faster: no capacity gain is credited above 25 °C.

/** Capacity multiplier for a lead-acid bank at a temperature (1 at and above 25 °C); 1 for LiFePO4. */
export function temperatureCapacityFactor(chemistry: Chemistry, temperatureC: number | undefined): number {
  if (temperatureC === undefined || !isLeadAcid(chemistry)) return 1;
  return 1 / interpolate(IEEE485_FACTORS_C, temperatureC);
}

/** Present capacity of the bank in Ah (parallel strings × rated Ah × health × temperature). */
export function bankCapacityAh(bank: Bank, temperatureC?: number): number {
  return bank.ratedAh * bank.parallelCount * ((bank.healthPct ?? 100) / 100) * temperatureCapacityFactor(bank.chemistry, temperatureC);
}

export function bankCapacityWh(bank: Bank, temperatureC?: number): number {
  return bankCapacityAh(bank, temperatureC) * bankNominalV(bank);
}

/**
 * Peukert's original form t = Cp / I^k, where Cp is the "Peukert capacity" (the capacity
 * at a 1 A discharge). The rated form is the same law with Cp = C^k · H^(1−k).
 */
export function peukertRuntimeFromPeukertCapacityH(peukertCapacityAh: number, currentA: number, exponent: number): number {
  return currentA > 0 ? peukertCapacityAh / Math.pow(currentA, exponent) : Number.POSITIVE_INFINITY;
}

export function peukertCapacityAh(capacityAh: number, ratedHourRateH: number, exponent: number): number {
  return Math.pow(capacityAh, exponent) * Math.pow(ratedHourRateH, 1 - exponent);
}

export interface PeukertInput {
  capacityAh: number;
  ratedHourRateH: number;
  currentA: number;
  exponent: number;
}

/** Peukert (1897) in its rated form: t = H · (C / (I·H))^k. */
export function peukertRuntimeH(p: PeukertInput): { runtimeH: number; effectiveCapacityAh: number; how: How } {
  if (p.currentA <= 0) {
    return { runtimeH: Number.POSITIVE_INFINITY, effectiveCapacityAh: p.capacityAh, how: how("no discharge current: no limit", { currentA: p.currentA }) };
  }
  const runtimeH = p.ratedHourRateH * Math.pow(p.capacityAh / (p.currentA * p.ratedHourRateH), p.exponent);
  return {
    runtimeH,
    effectiveCapacityAh: runtimeH * p.currentA,
    how: how("t = H · (C / (I·H))^k", { H_h: p.ratedHourRateH, C_Ah: r(p.capacityAh), I_A: r(p.currentA), k: p.exponent }, "Peukert's law in the rated-capacity form"),
  };
}

/**
 * Peukert-equivalent current: the rate at which a real current I drains the rated capacity.
 * I_eff = I · (I·H / C)^(k−1), consistent with t = C / I_eff = H (C/(I·H))^k.
 * Below the rated current (C/H) no extra capacity is credited: extrapolating Peukert to a
 * trickle would promise capacity the bank does not have (conservative choice).
 */
export function peukertEffectiveCurrentA(currentA: number, capacityAh: number, ratedHourRateH: number, exponent: number): number {
  if (currentA <= 0 || exponent === 1 || capacityAh <= 0) return currentA;
  if (currentA * ratedHourRateH <= capacityAh) return currentA;
  return currentA * Math.pow((currentA * ratedHourRateH) / capacityAh, exponent - 1);
}

export type Confidence = "high" | "medium" | "low";

export interface SocFromVoltage {
  socPct: number;
  /** Range given the resting-voltage uncertainty of the chemistry. */
  socLowPct: number;
  socHighPct: number;
  confidence: Confidence;
  /** True where the curve is too flat for voltage alone to give SoC. */
  flatCurve: boolean;
  how: How;
}

/** SoC from a resting (open-circuit) bank voltage, with an honest confidence. */
export function socFromRestingVoltage(bank: Bank, restingV: number): SocFromVoltage {
  const cells = bankCellsInSeries(bank);
  const cellV = restingV / cells;
  const { table, source } = RESTING_VOLTAGE_TABLES[bank.chemistry];
  const u = CHEMISTRY_DEFAULTS[bank.chemistry].restingVoltageUncertaintyVPerCell;
  const socPct = interpolate(table, cellV);
  const lo = interpolate(table, cellV - u);
  const hi = interpolate(table, cellV + u);
  const half = (hi - lo) / 2;
  // LiFePO4 rests between about 3.25 and 3.35 V per cell from roughly 20 % to 95 %: there
  // a voltage cannot name a SoC, whatever the interpolated range says.
  const flatCurve = bank.chemistry === "lifepo4" && socPct > 18 && socPct < 95;
  const confidence: Confidence = flatCurve || half > 20 ? "low" : half > 10 ? "medium" : "high";
  return {
    socPct,
    socLowPct: lo,
    socHighPct: hi,
    confidence,
    flatCurve,
    how: how(
      "SoC = table(V_rest / cells); range from ± voltage uncertainty per cell",
      { restingV: restingV, cellsInSeries: cells, cellV: r(cellV, 4), uncertaintyVPerCell: u },
      flatCurve
        ? `${source}. On the flat part of the LiFePO4 curve a few millivolts span tens of percent: use a shunt monitor's SoC instead.`
        : `${source}. Valid only after the bank has rested (about 6 h for lead-acid).`,
    ),
  };
}

/** SoC at which the resting curve reaches a voltage (used for the cutoff). */
export function socAtRestingVoltage(bank: Bank, restingV: number): number {
  return interpolate(RESTING_VOLTAGE_TABLES[bank.chemistry].table, restingV / bankCellsInSeries(bank));
}

export interface UsableEnergy {
  /** SoC at which use stops: the higher of the usable floor and the cutoff's SoC. */
  stopSocPct: number;
  limitedBy: "floor" | "cutoff";
  cutoffSocPct: number;
  usableAh: number;
  usableWh: number;
  /** Runtime at `currentA` with Peukert, when a current is given. */
  runtimeH?: number;
  how: How;
}

/**
 * Usable energy from the present SoC down to the usable floor or the low-voltage cutoff,
 * whichever comes first. The cutoff's SoC is read from the resting-voltage table (a loaded
 * bank sags below its resting voltage, so the real cutoff comes somewhat earlier).
 */
export function usableEnergy(bank: Bank, socPct: number, opts: { currentA?: number; temperatureC?: number } = {}): UsableEnergy {
  const capacityAh = bankCapacityAh(bank, opts.temperatureC);
  const cutoffSocPct = socAtRestingVoltage(bank, bank.lowVoltageCutoffV);
  const limitedBy = cutoffSocPct > bank.usableFloorSocPct ? "cutoff" : "floor";
  const stopSocPct = Math.max(cutoffSocPct, bank.usableFloorSocPct);
  const usableAh = Math.max(0, ((clamp(socPct, 0, 100) - stopSocPct) / 100) * capacityAh);
  const nominalV = bankNominalV(bank);
  const out: UsableEnergy = {
    stopSocPct,
    limitedBy,
    cutoffSocPct,
    usableAh,
    usableWh: usableAh * nominalV,
    how: how(
      "usable Ah = C × (SoC − max(floor, SoC at cutoff)) / 100; Wh = Ah × V_nominal",
      { capacityAh: r(capacityAh), socPct: r(socPct), floorSocPct: bank.usableFloorSocPct, cutoffSocPct: r(cutoffSocPct, 1), nominalV },
      "The cutoff's SoC comes from the resting-voltage table; under load the voltage sags and the cutoff may come earlier.",
    ),
  };
  if (opts.currentA !== undefined && opts.currentA > 0) {
    const k = bankPeukertExponent(bank);
    const iEff = peukertEffectiveCurrentA(opts.currentA, capacityAh, bankRatedHourRateH(bank), k);
    out.runtimeH = usableAh / iEff;
  } else if (opts.currentA !== undefined) {
    out.runtimeH = Number.POSITIVE_INFINITY;
  }
  return out;
}
