/**
 * The projection: a time-stepped simulation (default 5-minute steps over 72 h) of every bank
 * from its present SoC, with the loads of the plan at their local times, standby draws, solar
 * by the sun's position, and scheduled shore/alternator/generator charging. Sources serve the
 * loads first; a surplus charges the bank through its charge efficiency, a deficit discharges
 * it (Peukert-corrected). SoC is clamped at full and at the stop SoC (the higher of the usable
 * floor and the cutoff's SoC).
 */
import type { Bank, ChargerSource, RigModel, SolarSource } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import {
  bankCapacityAh, bankChargeEfficiency, bankNominalV, bankPeukertExponent, bankRatedHourRateH,
  peukertEffectiveCurrentA, socFromRestingVoltage, usableEnergy,
} from "./battery";
import { computeBudget, drawProfiles, findMode, PROFILE_SLOTS, type Budget, type PlanInput } from "./draw";
import { how, r, type How } from "./explain";
import { arrayPowerW, clearSkyComponents, dayOfYear, extraterrestrialIrradianceWm2, interpolateSunCoordinates, sunCoordinates, sunHorizontal, transposeWm2, utcOffsetMinutes, type SunCoordinates } from "./solar";
import type { CurrentState } from "./state";
import { inWindow } from "./units";
import { primaryBank } from "./primary-bank";
import { carrySocForward, type CarriedSoc } from "./carry-forward";

export interface ProjectionOptions {
  horizonH?: number;
  stepMin?: number;
}

export interface BankProjection {
  bankId: string;
  name: string;
  startSocPct: number;
  /** Where the start SoC came from ("carried": a reading taken earlier, projected to now). */
  startSocFrom: "soc" | "resting-voltage" | "assumed-full" | "carried";
  /** For a carried reading: when it was taken and its value then. */
  carriedFrom?: { takenAt: string; socPct: number; segments: number };
  startSocConfidence: "high" | "medium" | "low";
  stopSocPct: number;
  /** SoC at each time in `timesMs` (first point = now). */
  socPct: number[];
  minSocPct: number;
  endSocPct: number;
  /** Hours from now until the stop SoC; null if not reached within the horizon. */
  runwayH: number | null;
  socAtNextSunrisePct: number | null;
  /** Energy balance over the horizon, Wh. */
  energy: {
    /** Produced by this bank's sources (solar, chargers). */
    sourceWh: number;
    /** Drawn by loads and standby. */
    loadWh: number;
    /** Sent into the battery (before charge efficiency). */
    chargedWh: number;
    chargeEfficiency: number;
    /** Taken out of the battery for loads. */
    drawnWh: number;
    /** Extra drain (positive) or gain (negative) by Peukert's law. */
    peukertWh: number;
    /** Source energy that could not be stored (bank full). */
    curtailedWh: number;
    /** Load energy not served because the bank sat at its stop SoC. */
    unmetWh: number;
    storedChangeWh: number;
  };
  tillDawn: TillDawn;
  how: How;
}

export interface TillDawn {
  /** Charging exceeds draw right now. */
  chargingNow: boolean;
  /** Start of the next charging window (net charge after a spell without), or null. */
  nextWindowMs: number | null;
  nextWindowKind: "sun" | "drive" | "shore" | "generator" | "charger" | null;
  /** The bank reaches that window above its stop SoC. */
  reaches: boolean;
  /** Hours between the window and the runway's end (negative: the floor comes first). */
  marginH: number | null;
  /** SoC above the stop SoC at the window, percentage points. */
  marginSocPct: number | null;
  summary: string;
  how: How;
}

export interface Projection {
  startMs: number;
  stepMin: number;
  horizonH: number;
  timesMs: number[];
  nextSunriseMs: number | null;
  banks: BankProjection[];
  /** The primary bank's results (./primary-bank), for the headline. */
  primaryBankId: string;
  budget: Budget;
}

/** Local-hour function for a time zone over an interval (handles one DST change). */
export function localHourFn(startMs: number, endMs: number, timeZone: string): (ms: number) => number {
  const a = utcOffsetMinutes(startMs, timeZone);
  const b = utcOffsetMinutes(endMs, timeZone);
  let switchMs = Number.POSITIVE_INFINITY;
  if (a !== b) {
    let lo = startMs, hi = endMs;
    while (hi - lo > 60000) {
      const mid = Math.floor((lo + hi) / 2);
      if (utcOffsetMinutes(mid, timeZone) === a) lo = mid;
      else hi = mid;
    }
    switchMs = hi;
  }
  return (ms) => {
    const off = ms < switchMs ? a : b;
    const h = ((ms + off * 60000) / 3600000) % 24;
    return h < 0 ? h + 24 : h;
  };
}

export function resolveStartSoc(bank: Bank, state: CurrentState): { socPct: number; from: BankProjection["startSocFrom"]; confidence: BankProjection["startSocConfidence"] } {
  const s = state.banks.find((b) => b.bankId === bank.id);
  if (s?.socPct !== undefined) return { socPct: s.socPct, from: "soc", confidence: "high" };
  if (s?.restingV !== undefined) {
    const v = socFromRestingVoltage(bank, s.restingV);
    return { socPct: v.socPct, from: "resting-voltage", confidence: v.confidence };
  }
  return { socPct: 100, from: "assumed-full", confidence: "low" };
}

function sourceActive(src: ChargerSource, modeSources: Map<string, { enabled: boolean; windows?: { startH: number; endH: number }[] }>, hour: number): boolean {
  const m = modeSources.get(src.id);
  if (!m || !m.enabled) return false;
  if (!m.windows || m.windows.length === 0) return true;
  return m.windows.some((w) => inWindow(hour, w.startH, w.endH));
}

const kindOfWindow = (k: ChargerSource["kind"]): TillDawn["nextWindowKind"] =>
  k === "alternator" || k === "dcdc" ? "drive" : k === "shore" ? "shore" : k === "generator" ? "generator" : "charger";

/**
 * Run the projection. The model must be valid and `graph` built from it.
 */
export function runProjection(model: RigModel, graph: CircuitGraph, stateIn: CurrentState, options: ProjectionOptions = {}): Projection {
  // An SoC read earlier is first carried forward to dateTime through the states in between.
  const { state, carried } = stateIn.banks.some((b) => b.takenAt !== undefined)
    ? carrySocForward(model, graph, stateIn, runProjection)
    : { state: stateIn, carried: [] as CarriedSoc[] };
  const horizonH = options.horizonH ?? 72;
  const stepMin = options.stepMin ?? 5;
  const steps = Math.max(1, Math.round((horizonH * 60) / stepMin));
  const dtH = stepMin / 60;
  const stepMs = stepMin * 60000;
  const startMs = Date.parse(state.dateTime);
  const endMs = startMs + steps * stepMs;
  const localHour = localHourFn(startMs, endMs, model.timeZone);

  const plan: PlanInput = {
    modeId: state.modeId,
    ...(state.loadsOn ? { loadsOn: state.loadsOn } : {}),
    ...(state.inverterIdsOn ? { inverterIdsOn: state.inverterIdsOn } : {}),
  };
  const budget = computeBudget(model, graph, plan);
  const profiles = drawProfiles(model, graph, budget, plan);
  const mode = findMode(model, state.modeId);
  const modeSources = new Map(mode.sources.map((s) => [s.sourceId, s]));
  const place = state.location ?? model.home;
  const weather = state.weatherFactor ?? 1;
  const ambientC = state.ambientC ?? 20;

  const nb = model.banks.length;
  const bankIndex = new Map(model.banks.map((b, i) => [b.id, i]));
  const V = model.banks.map(bankNominalV);
  const tempC = model.banks.map((b) => state.banks.find((s) => s.bankId === b.id)?.temperatureC);
  const capWh = model.banks.map((b, i) => bankCapacityAh(b, tempC[i]) * V[i]!);
  const capAh = model.banks.map((b, i) => bankCapacityAh(b, tempC[i]));
  const eff = model.banks.map(bankChargeEfficiency);
  const k = model.banks.map(bankPeukertExponent);
  const H = model.banks.map(bankRatedHourRateH);
  const start = model.banks.map((b) => resolveStartSoc(b, state));
  const stopSoc = model.banks.map((b, i) => usableEnergy(b, start[i]!.socPct).stopSocPct);
  const stopWh = stopSoc.map((s, i) => (s / 100) * capWh[i]!);
  const E = start.map((s, i) => (Math.max(s.socPct, 0) / 100) * capWh[i]!);
  const E0 = [...E];
  const prof = model.banks.map((b) => profiles.get(b.id)!);

  // Each source's current goes to the banks on its net, by the net's shares (./solution).
  const sol = budget.solution;
  const sharesOf = (id: string) => (sol.sources[id]?.bankShares ?? []).map((x) => ({ i: bankIndex.get(x.bankId)!, share: x.share }));
  const solar = model.sources.filter((s): s is SolarSource => s.kind === "solar")
    .filter((s) => modeSources.get(s.id)?.enabled !== false && sharesOf(s.id).length > 0);
  const chargers = model.sources.filter((s): s is ChargerSource => s.kind !== "solar" && sharesOf(s.id).length > 0);
  const chargerShares = chargers.map((c) => sharesOf(c.id));
  const chargerV = chargers.map((c) => sol.nets[sol.sources[c.id]!.netId!]!.voltageV);

  const soc: number[][] = model.banks.map(() => new Array<number>(steps + 1));
  const timesMs = new Array<number>(steps + 1);
  for (let i = 0; i < nb; i++) soc[i]![0] = (100 * E[i]!) / capWh[i]!;
  timesMs[0] = startMs;

  const acc = model.banks.map(() => ({ sourceWh: 0, loadWh: 0, chargedWh: 0, drawnWh: 0, peukertWh: 0, curtailedWh: 0, unmetWh: 0 }));
  const runwayStep: (number | null)[] = model.banks.map((_, i) => (E[i]! <= stopWh[i]! + 1e-9 && start[i]!.socPct <= stopSoc[i]! ? 0 : null));
  const chargingNow = new Array<boolean>(nb).fill(false);
  const windowStep: (number | null)[] = new Array(nb).fill(null);
  const windowKind: TillDawn["nextWindowKind"][] = new Array(nb).fill(null);
  const wasCharging = new Array<boolean>(nb).fill(false);
  let sunriseStep: number | null = null;
  let prevUp: boolean | null = null;
  const srcW = new Float64Array(nb);
  const loadW = new Float64Array(nb);
  const supplyDrawW = new Float64Array(nb);
  const kindAtStep: TillDawn["nextWindowKind"][] = new Array(nb).fill(null);

  const coordCache: SunCoordinates[] = [];
  const coordsAt = (h: number): SunCoordinates => (coordCache[h] ??= sunCoordinates(startMs + h * 3600000));
  const sunOpts = { elevationM: place.elevationM ?? 0 };
  const scratch: SunCoordinates = { alphaRad: 0, deltaRad: 0, distanceAu: 0, eqEquinoxDeg: 0 };
  const doyStart = dayOfYear(startMs);
  const e0ByDay: number[] = [];
  const solarShares = solar.map((src) => sharesOf(src.id));
  const solarV = solar.map((src) => sol.nets[sol.sources[src.id]!.netId!]!.voltageV);
  const wf = Math.min(1, Math.max(0, weather));
  for (let s = 0; s < steps; s++) {
    const t0 = startMs + s * stepMs;
    const mid = t0 + stepMs / 2;
    const hour = localHour(mid);
    const slot = Math.min(PROFILE_SLOTS - 1, Math.floor((hour / 24) * PROFILE_SLOTS));
    srcW.fill(0);
    supplyDrawW.fill(0);
    kindAtStep.fill(null);
    for (let i = 0; i < nb; i++) loadW[i] = prof[i]![slot]!;

    // The sun's coordinates change slowly: compute them hourly and interpolate (error < 1e-5°).
    const hourIdx = Math.floor((mid - startMs) / 3600000);
    const f = (mid - startMs) / 3600000 - hourIdx;
    const sun = sunHorizontal(interpolateSunCoordinates(coordsAt(hourIdx), coordsAt(hourIdx + 1), f, scratch), mid, place.latDeg, place.lonDeg, sunOpts);
    const up = sun.elevationDeg > -0.267;
    if (prevUp === false && up && sunriseStep === null) sunriseStep = s;
    prevUp = up;
    if (up && solar.length) {
      const day = Math.floor((mid - startMs) / 86400000);
      const e0 = (e0ByDay[day] ??= extraterrestrialIrradianceWm2(doyStart + day));
      const comp = clearSkyComponents(sun.zenithDeg, e0);
      for (let j = 0; j < solar.length; j++) {
        const src = solar[j]!;
        const poa = transposeWm2(comp, sun.zenithDeg, sun.azimuthDeg, src.tiltDeg, src.azimuthDeg) * wf;
        const w = arrayPowerW(src, poa, ambientC, solarV[j]!);
        for (const { i: bi, share } of solarShares[j]!) {
          srcW[bi] = srcW[bi]! + w * share;
          if (w > 0) kindAtStep[bi] = "sun";
        }
      }
    }
    for (let j = 0; j < chargers.length; j++) {
      const src = chargers[j]!;
      if (!sourceActive(src, modeSources, hour)) continue;
      const w = src.ratedA * chargerV[j]!;
      for (const { i: bi, share } of chargerShares[j]!) {
        srcW[bi] = srcW[bi]! + w * share;
        kindAtStep[bi] = kindOfWindow(src.kind);
      }
      if (src.kind === "charger" && src.supplyBankId !== undefined) {
        const si = bankIndex.get(src.supplyBankId);
        if (si !== undefined) supplyDrawW[si] = supplyDrawW[si]! + w / ((src.efficiencyPct ?? 90) / 100);
      }
    }

    for (let i = 0; i < nb; i++) {
      const lw = loadW[i]! + supplyDrawW[i]!;
      const sw = srcW[i]!;
      const a = acc[i]!;
      a.sourceWh += sw * dtH;
      a.loadWh += lw * dtH;
      const net = sw - lw;
      const charging = net > 0;
      if (s === 0) chargingNow[i] = charging;
      if (charging && !wasCharging[i] && s > 0 && windowStep[i] === null) {
        windowStep[i] = s;
        windowKind[i] = kindAtStep[i] ?? "sun";
      }
      wasCharging[i] = charging;
      if (net >= 0) {
        const room = (capWh[i]! - E[i]!) / eff[i]!;
        const want = net * dtH;
        const stored = Math.min(want, Math.max(0, room));
        E[i] = Math.min(capWh[i]!, E[i]! + stored * eff[i]!);
        a.chargedWh += stored;
        a.curtailedWh += want - stored;
      } else {
        const needWh = -net * dtH;
        const I = -net / V[i]!;
        const iEff = peukertEffectiveCurrentA(I, capAh[i]!, H[i]!, k[i]!);
        const drainWh = iEff * V[i]! * dtH;
        const avail = Math.max(0, E[i]! - stopWh[i]!);
        const frac = drainWh > 0 ? Math.min(1, avail / drainWh) : 1;
        E[i] = E[i]! - drainWh * frac;
        a.drawnWh += needWh * frac;
        a.peukertWh += (drainWh - needWh) * frac;
        a.unmetWh += needWh * (1 - frac);
        if (frac < 1 && runwayStep[i] === null) {
          runwayStep[i] = s + frac; // fraction of this step used before the stop
        }
      }
      soc[i]![s + 1] = (100 * E[i]!) / capWh[i]!;
    }
    timesMs[s + 1] = t0 + stepMs;
  }

  const banks: BankProjection[] = model.banks.map((b, i) => {
    const curve = soc[i]!;
    let min = curve[0]!;
    for (const x of curve) if (x < min) min = x;
    const rs = runwayStep[i];
    const runwayH = rs === null || rs === undefined ? null : rs * dtH;
    const ws = windowStep[i];
    const windowMs = ws === null || ws === undefined ? null : startMs + ws * stepMs;
    const reaches = ws === null || ws === undefined ? runwayH === null : runwayH === null || runwayH >= ws * dtH;
    const marginH = ws === null || ws === undefined
      ? null
      : runwayH === null ? null : runwayH - ws * dtH;
    const marginSocPct = ws === null || ws === undefined ? null : curve[ws]! - stopSoc[i]!;
    const a = acc[i]!;
    const storedChangeWh = E[i]! - E0[i]!;
    const when = windowMs === null ? "" : new Date(windowMs).toISOString();
    const summary = ws === null || ws === undefined
      ? runwayH === null
        ? `No charging window within ${horizonH} h, and the bank stays above its floor.`
        : `No charging window within ${horizonH} h; the floor comes in ${r(runwayH, 1)} h.`
      : reaches
        ? `Reaches the next charge (${windowKind[i]}) with ${r(marginSocPct ?? 0, 1)} % to spare${marginH === null ? "" : ` and ${r(marginH, 1)} h of margin`}.`
        : `Falls to the floor ${r(-(marginH ?? 0), 1)} h before the next charge (${windowKind[i]}).`;
    return {
      bankId: b.id,
      name: b.name,
      startSocPct: start[i]!.socPct,
      startSocFrom: carried.some((c) => c.bankId === b.id) ? "carried" : start[i]!.from,
      ...(() => { const c = carried.find((x) => x.bankId === b.id); return c ? { carriedFrom: { takenAt: c.takenAt, socPct: c.fromSocPct, segments: c.segments } } : {}; })(),
      startSocConfidence: start[i]!.confidence,
      stopSocPct: stopSoc[i]!,
      socPct: curve,
      minSocPct: min,
      endSocPct: curve[steps]!,
      runwayH,
      socAtNextSunrisePct: sunriseStep === null ? null : curve[sunriseStep]!,
      energy: { ...a, chargeEfficiency: eff[i]!, storedChangeWh },
      tillDawn: {
        chargingNow: chargingNow[i]!,
        nextWindowMs: windowMs,
        nextWindowKind: windowKind[i]!,
        reaches,
        marginH,
        marginSocPct,
        summary,
        how: how(
          "next window = first step after a spell without charge where sources exceed draw; margin = runway − time to window",
          { windowAt: when, runwayH: runwayH === null ? `> ${horizonH}` : r(runwayH, 2), stopSocPct: r(stopSoc[i]!, 1) },
        ),
      },
      how: how(
        "E(t+Δt) = E(t) + η·max(0, P_src − P_load)·Δt − Peukert(max(0, P_load − P_src))·Δt, clamped to [E_stop, E_full]",
        {
          capacityWh: r(capWh[i]!, 1), startSocPct: r(start[i]!.socPct, 1), stopSocPct: r(stopSoc[i]!, 1), stepMin, horizonH,
          chargeEfficiency: eff[i]!, peukertExponent: k[i]!, weatherFactor: weather,
        },
        start[i]!.from === "assumed-full" ? "No SoC or resting voltage given: the bank was assumed full." : undefined,
      ),
    };
  });
  const primary = primaryBank(model);
  return {
    startMs,
    stepMin,
    horizonH,
    timesMs,
    nextSunriseMs: sunriseStep === null ? null : startMs + sunriseStep * stepMs,
    banks,
    primaryBankId: primary.id,
    budget,
  };
}
