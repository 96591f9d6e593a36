/**
 * The wiring audit: for every circuit its design current, voltage drop, ampacity and
 * protection checks; and the loads that can drain a bank past its low-voltage cutoff.
 */
import type { Circuit, RigModel } from "./model";
import type { CircuitGraph } from "./circuit-graph";
import { bankNominalV } from "./battery";
import { ampacityA, cableLabel, checkProtection, voltageDrop, type ProtectionCheck, type TempRatingC, type VoltageDrop } from "./cable";
import { loadPower } from "./draw";
import { how, r, type How } from "./explain";
import { auditFindings, type EndToEndDrop, type Finding } from "./findings";
import type { PlanInput } from "./plan";
import { solveState } from "./solution";

export interface CircuitAudit {
  circuitId: string;
  name: string;
  current: "dc" | "ac";
  voltageV: number;
  /** Design current: what the circuit must carry with everything downstream running. */
  designA: number;
  continuousA: number;
  cable: null | { label: string; lengthM: number; drop: VoltageDrop; ampacityA: number; ampacityOk: boolean };
  protection: null | (ProtectionCheck & { name: string; kind: "fuse" | "breaker" });
  failures: string[];
  how: How;
}

export interface Audit {
  circuits: CircuitAudit[];
  /** Wiring findings for the present switch positions, worst first (./findings). */
  findings: Finding[];
  /** Bank-to-load voltage drop of every DC load on, through cables and devices. */
  endToEnd: EndToEndDrop[];
  /** Loads switched on and fed, in the present positions, from a port without low-voltage protection. */
  outsideLowVoltageProtection: { loadId: string; name: string; bankIds: string[]; essential: boolean }[];
  failures: { circuitId: string; message: string }[];
  failureCount: number;
  caution: string;
}

export const SAFETY_CAUTION =
  "Planning aid only. Wiring, fusing, lithium batteries and shore power can hurt people and start fires: follow ABYC E-11 and ISO 13297 on boats, NFPA 70 article 551 or AS/NZS 3001 in vehicles, the makers' instructions and licensed practice.";

/** A load is continuous if some mode runs it 3 h or more a day (NEC's 3-hour definition, applied to daily hours). */
function continuousLoads(model: RigModel): Set<string> {
  const s = new Set<string>();
  for (const m of model.modes) for (const l of m.loads) if (l.hoursPerDay >= 3) s.add(l.loadId);
  return s;
}

/** The audit for the graph's switch positions and a plan (default: the first mode). */
export function runAudit(model: RigModel, graph: CircuitGraph, plan: PlanInput = { modeId: model.modes[0]!.id }): Audit {
  const continuous = continuousLoads(model);
  const loads = new Map(model.loads.map((l) => [l.id, l]));
  const buses = new Map(model.buses.map((b) => [b.id, b]));
  const protections = new Map(model.protections.map((p) => [p.id, p]));
  const inverters = new Map(model.inverters.map((i) => [i.id, i]));
  const sources = new Map(model.sources.map((s) => [s.id, s]));
  const houseV = bankNominalV(model.banks.find((b) => b.role === "house") ?? model.banks[0]!);
  const bankV = (id: string) => {
    const b = model.banks.find((x) => x.id === id);
    return b ? bankNominalV(b) : houseV;
  };
  // Which inverter's AC side a bus is on (first found through circuits).
  const acVOf = (c: Circuit): number | null => {
    if (c.from.kind === "inverter") return inverters.get(c.from.id)?.acNominalV ?? 230;
    const fromBus = c.from.kind === "bus" ? buses.get(c.from.id) : undefined;
    if (fromBus?.current === "ac" || (c.to.kind === "load" && loads.get(c.to.id)?.current === "ac")) {
      const ids = graph.loadsByCircuit[c.id] ?? [];
      for (const id of ids) {
        const inv = graph.loads[id]?.primary?.inverterIds[0];
        if (inv) return inverters.get(inv)?.acNominalV ?? 230;
      }
      return 230;
    }
    return null;
  };
  // Sources feeding each node, for charge-side feeders.
  const sourceAInto = new Map<string, number>();
  for (const c of model.circuits) {
    if (c.from.kind !== "source") continue;
    const s = sources.get(c.from.id);
    if (!s) continue;
    const v = c.to.kind === "bank" ? bankV(c.to.id) : houseV;
    const a = s.kind === "solar" ? s.maxChargeA ?? s.peakW / v : s.ratedA;
    const key = c.to.kind === "bank" ? `${c.to.id}/${c.to.port}` : c.to.id;
    sourceAInto.set(key, (sourceAInto.get(key) ?? 0) + a);
  }

  const circuits: CircuitAudit[] = model.circuits.map((c) => {
    const acV = acVOf(c);
    const supplyBank = c.from.kind === "bank" ? c.from.id : graph.loads[(graph.loadsByCircuit[c.id] ?? [])[0] ?? ""]?.bankId ?? null;
    const v = acV ?? (supplyBank ? bankV(supplyBank) : houseV);
    let contA = 0;
    let nonA = 0;
    if (c.from.kind === "source") {
      const s = sources.get(c.from.id)!;
      const a = s.kind === "solar" ? s.maxChargeA ?? s.peakW / v : s.ratedA;
      contA = a; // chargers run for hours: continuous
    } else if (c.to.kind === "inverter") {
      const inv = inverters.get(c.to.id)!;
      contA = inv.ratedW / (inv.efficiencyPct / 100) / v;
    } else if (c.from.kind === "inverter") {
      // Limited by the inverter itself: its rated output, not a 125 % continuous load.
      const inv = inverters.get(c.from.id)!;
      nonA = inv.ratedW / v;
    } else {
      for (const id of graph.loadsByCircuit[c.id] ?? []) {
        const load = loads.get(id)!;
        const p = loadPower(model, graph, load);
        const a = acV !== null ? p.runW / acV : p.bankA;
        if (continuous.has(id)) contA += a;
        else nonA += a;
      }
      if (c.to.kind === "bus") {
        const into = sourceAInto.get(c.to.id) ?? 0;
        if (into > contA + nonA) { contA = into; nonA = 0; }
      }
    }
    const designA = contA + nonA;
    const failures: string[] = [];
    let cable: CircuitAudit["cable"] = null;
    if (c.cable) {
      const drop = voltageDrop(c.cable.size, c.cable.lengthM, designA, v, c.criticality);
      const amp = ampacityA(c.cable.size, c.cable.tempRatingC as TempRatingC, c.cable.engineSpace).ampacityA;
      cable = { label: cableLabel(c.cable.size), lengthM: c.cable.lengthM, drop, ampacityA: amp, ampacityOk: amp >= designA };
      if (!drop.ok) failures.push(`Voltage drop ${r(drop.dropPct, 1)} % exceeds ${drop.limitPct} % at ${r(designA, 1)} A`);
      if (amp < designA) failures.push(`${cable.label} carries ${r(amp, 0)} A but the circuit needs ${r(designA, 1)} A`);
    }
    let protection: CircuitAudit["protection"] = null;
    if (c.protectionId) {
      const p = protections.get(c.protectionId)!;
      const chk = checkProtection(p.ratingA, contA, nonA, c.cable?.size, cable?.ampacityA);
      protection = { ...chk, name: p.name, kind: p.kind };
      if (!chk.coversLoad) failures.push(`${p.name} is below the ${r(chk.requiredMinA, 1)} A the load needs (continuous at 125 %)`);
      if (!chk.protectsConductor) failures.push(`${p.name} is above the ${r(chk.maxForConductorA, 0)} A the conductor allows`);
    } else if (c.from.kind === "bank" || c.from.kind === "bus") {
      failures.push("No fuse or breaker protects this circuit");
    }
    return {
      circuitId: c.id,
      name: c.name,
      current: acV === null ? "dc" : "ac",
      voltageV: v,
      designA,
      continuousA: contA,
      cable,
      protection,
      failures,
      how: how(
        "design current = Σ downstream running currents (continuous loads: 3 h/day or more); source and inverter circuits at their rating",
        { continuousA: r(contA, 2), nonContinuousA: r(nonA, 2), voltageV: v },
      ),
    };
  });

  const sol = solveState(model, graph, plan);
  const outside = model.loads
    .filter((l) => sol.loadsOn.includes(l.id) && sol.loads[l.id]!.powered && sol.loads[l.id]!.drainsBankIds.length > 0)
    .map((l) => ({ loadId: l.id, name: l.name, bankIds: sol.loads[l.id]!.drainsBankIds, essential: l.essential }));
  const failures = circuits.flatMap((c) => c.failures.map((message) => ({ circuitId: c.circuitId, message })));
  const { findings, endToEnd } = auditFindings(model, graph, plan);
  return { circuits, findings, endToEnd, outsideLowVoltageProtection: outside, failures, failureCount: failures.length, caution: SAFETY_CAUTION };
}
