/**
 * Days of autonomy for a mode, with no charging and with typical sun, and a bank sizing hint.
 */
import type { RigModel, SolarSource } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import { bankCapacityAh, bankChargeEfficiency, bankNominalV, bankPeukertExponent, bankRatedHourRateH, peukertEffectiveCurrentA, usableEnergy } from "./battery";
import type { Budget } from "./draw";
import { how, r, type How } from "./explain";
import { harvestArrays } from "./solar";
import type { CurrentState } from "./state";
import { localDate } from "./time";

/** Share of clear-sky harvest assumed for "typical" sun when the caller gives none (an
 * assumption, not a climate statistic: override with the local clearness). */
export const TYPICAL_WEATHER_FACTOR = 0.7;

/** Daily harvests by value of their inputs: a tap that switches a load does not move the sun. */
const harvestCache = new Map<string, number>();

export interface Autonomy {
  bankId: string;
  name: string;
  /** From full down to the stop SoC. */
  usableWh: number;
  dailyDrawWh: number;
  /** Peukert-equivalent daily drain (lead-acid at its average current). */
  effectiveDailyDrawWh: number;
  daysNoCharge: number | null;
  typicalSolarWhPerDay: number;
  /** Null when typical sun covers the day's draw. */
  daysWithTypicalSun: number | null;
  sizing: { targetDays: number; requiredUsableWh: number; requiredRatedAh: number; currentRatedAh: number };
  how: How;
}

/**
 * Days of autonomy of one bank. Typical solar needs a date: it is taken from `state.dateTime`;
 * without a state there is no solar estimate (the engine never reads the clock).
 */
export function autonomy(
  model: RigModel, graph: CircuitGraph, budget: Budget, bankId: string,
  state?: Pick<CurrentState, "dateTime" | "location" | "weatherFactor" | "ambientC">,
  opts: { targetDays?: number; typicalWeatherFactor?: number } = {},
): Autonomy {
  void graph;
  const bank = model.banks.find((b) => b.id === bankId) ?? model.banks[0]!;
  const v = bankNominalV(bank);
  const capAh = bankCapacityAh(bank);
  const full = usableEnergy(bank, 100);
  const daily = budget.banks.find((b) => b.bankId === bank.id)?.whPerDay ?? 0;
  const avgA = daily / 24 / v;
  const effA = peukertEffectiveCurrentA(avgA, capAh, bankRatedHourRateH(bank), bankPeukertExponent(bank));
  const effDaily = effA * 24 * v;
  const daysNoCharge = effDaily > 0 ? full.usableWh / effDaily : null;

  const place = state?.location ?? model.home;
  const date = state ? localDate(Date.parse(state.dateTime), model.timeZone) : null;
  const wf = opts.typicalWeatherFactor ?? state?.weatherFactor ?? TYPICAL_WEATHER_FACTOR;
  // The arrays whose current reaches this bank, with the bank's share of each (./solution).
  const sol = budget.solution;
  const shareOf = (id: string) => sol.sources[id]?.bankShares.find((x) => x.bankId === bank.id)?.share ?? 0;
  const arrays = model.sources.filter((s): s is SolarSource => s.kind === "solar" && shareOf(s.id) > 0);
  const shares = arrays.map((a) => shareOf(a.id));
  let solarWh = 0;
  if (arrays.length && date) {
    const key = JSON.stringify([arrays, shares, place, model.timeZone, date, wf, state?.ambientC ?? 20, v]);
    const cached = harvestCache.get(key);
    if (cached !== undefined) solarWh = cached;
    else {
      const h = harvestArrays(arrays, { ...place, timeZone: model.timeZone }, date, { weatherFactor: wf, ambientC: state?.ambientC ?? 20, bankV: v });
      h.hourlyWh.forEach((row, j) => { for (const wh of row) solarWh += wh * shares[j]!; });
      if (harvestCache.size >= 32) harvestCache.delete(harvestCache.keys().next().value!);
      harvestCache.set(key, solarWh);
    }
  }
  const eff = bankChargeEfficiency(bank);
  // Conservative: all solar passes through the battery once (× η) before use.
  const deficit = effDaily - solarWh * eff;
  const daysWithTypicalSun = deficit > 0 ? full.usableWh / deficit : null;

  const targetDays = opts.targetDays ?? 3;
  const requiredUsableWh = effDaily * targetDays;
  const usableShare = (100 - full.stopSocPct) / 100;
  const requiredRatedAh = usableShare > 0 ? requiredUsableWh / v / usableShare / ((bank.healthPct ?? 100) / 100) : Number.NaN;
  return {
    bankId: bank.id,
    name: bank.name,
    usableWh: full.usableWh,
    dailyDrawWh: daily,
    effectiveDailyDrawWh: effDaily,
    daysNoCharge,
    typicalSolarWhPerDay: solarWh,
    daysWithTypicalSun,
    sizing: { targetDays, requiredUsableWh, requiredRatedAh: Number.isFinite(requiredRatedAh) ? requiredRatedAh : 0, currentRatedAh: bank.ratedAh * bank.parallelCount },
    how: how(
      "days = usable Wh (full → stop) / (daily draw − η × typical solar); size = daily × target days / V / usable share",
      { usableWh: r(full.usableWh, 0), dailyWh: r(daily, 0), solarWhPerDay: r(solarWh, 0), weatherFactor: wf, chargeEfficiency: eff, stopSocPct: r(full.stopSocPct, 1) },
      "Typical sun is the clear-sky harvest on the date × the weather factor; set it from local experience.",
    ),
  };
}
