/**
 * Wiring findings for one rig state (the present switch positions), worst first. Each says
 * why it matters, the numbers, how they were computed, the standard or practice it follows
 * and the safety caution.
 */
import type { Circuit, RigModel } from "./model";
import type { CircuitGraph, FeedPath } from "./circuit-graph";
import { isLeadAcid } from "./battery";
import { conductorResistanceOhmPerM, voltageDropLimitPct } from "./cable";
import { loadPower } from "./draw";
import { how, r, type How } from "./explain";
import type { PlanInput } from "./plan";
import { portMOhm, protectionMOhm, RESISTANCE_SOURCE, switchMOhm, terminationsMOhm } from "./resistance";
import { circuitConducts, portRequires, solveState, bmsStateFor, type Solution } from "./solution";

export type FindingKind = "backdoor-charging" | "mixed-chemistry" | "end-to-end-drop" | "outside-protection" | "changeover-no-position";
export type Severity = "danger" | "warning" | "notice";

export interface Finding {
  /** Stable key, e.g. "backdoor-charging:bat-b/load". */
  id: string;
  kind: FindingKind;
  severity: Severity;
  title: string;
  why: string;
  numbers: Record<string, number | string>;
  how: How;
  standard: string;
  caution: string;
  /** Ids of the banks, loads, switches or circuits concerned. */
  subjectIds: string[];
}

export interface EndToEndDrop {
  loadId: string;
  name: string;
  /** Sum over the path of I × R of cables, devices and terminations. */
  dropV: number;
  dropPct: number;
  limitPct: number;
  ok: boolean;
  segments: { circuitId: string; name: string; currentA: number; cableMOhm: number; devicesMOhm: number; dropV: number }[];
  how: How;
}

export const FINDING_CAUTION =
  "Planning aid only: wiring, fusing and lithium batteries can hurt people and start fires. Follow the battery maker's instructions, ABYC E-11 / ISO 13297 on boats, NFPA 70 article 551 or AS/NZS 3001 in vehicles, and licensed practice.";

const SEVERITY_RANK: Record<Severity, number> = { danger: 0, warning: 1, notice: 2 };
const KIND_RANK: Record<FindingKind, number> = { "backdoor-charging": 0, "mixed-chemistry": 1, "outside-protection": 2, "end-to-end-drop": 3, "changeover-no-position": 4 };

const listWords = (xs: string[]) => (xs.length <= 1 ? xs.join("") : `${xs.slice(0, -1).join(", ")} and ${xs[xs.length - 1]}`);

/** Current a source can deliver, A at the net voltage. */
function sourceA(model: RigModel, id: string, v: number): number {
  const s = model.sources.find((x) => x.id === id);
  if (!s) return 0;
  return s.kind === "solar" ? s.maxChargeA ?? s.peakW / v : s.ratedA;
}

/** Running current of every load on and powered, per circuit of the present state. */
export function circuitCurrents(model: RigModel, graph: CircuitGraph, plan: PlanInput, sol: Solution): Map<string, number> {
  const out = new Map<string, number>();
  const add = (id: string, a: number) => out.set(id, (out.get(id) ?? 0) + a);
  const byId = new Map(model.circuits.map((c) => [c.id, c]));
  for (const id of sol.loadsOn) {
    const feed = sol.loads[id];
    const load = model.loads.find((l) => l.id === id);
    if (!feed?.powered || !load || load.current === "ac") continue;
    const a = loadPower(model, graph, load, plan).bankA;
    const seen = new Set<string>();
    for (const p of graph.paths.loads[id] ?? []) {
      if (p.supply.kind !== "bank") continue;
      const supply = p.supply;
      const share = feed.bankShares.find((s) => s.bankId === supply.bankId && s.portId === supply.portId)?.share;
      if (share === undefined) continue;
      if (!p.circuitIds.every((c) => circuitConducts(byId.get(c)!, sol.at))) continue;
      p.circuitIds.forEach((cid, i) => {
        if (i === 0) add(cid, a * share);
        else if (!seen.has(cid)) { seen.add(cid); add(cid, a); }
      });
    }
  }
  return out;
}

function circuitMOhm(model: RigModel, c: Circuit): { cableMOhm: number; devicesMOhm: number } {
  const cableMOhm = c.cable ? conductorResistanceOhmPerM(c.cable.size, 30) * 2 * c.cable.lengthM * 1000 : 0;
  let devicesMOhm = terminationsMOhm(c);
  const p = c.protectionId ? model.protections.find((x) => x.id === c.protectionId) : undefined;
  if (p) devicesMOhm += protectionMOhm(p);
  for (const s of c.switches) {
    const sw = model.switches.find((x) => x.id === s.switchId);
    if (sw) devicesMOhm += switchMOhm(sw);
  }
  return { cableMOhm, devicesMOhm };
}

/** End-to-end drop from the bank port to a load along its path in the present state. */
export function endToEndDrop(model: RigModel, loadId: string, path: FeedPath, currents: Map<string, number>, voltageV: number): EndToEndDrop {
  const load = model.loads.find((l) => l.id === loadId)!;
  const byId = new Map(model.circuits.map((c) => [c.id, c]));
  const segments: EndToEndDrop["segments"] = [];
  let dropV = 0;
  if (path.supply.kind === "bank") {
    const supply = path.supply;
    const bank = model.banks.find((b) => b.id === supply.bankId)!;
    const port = bank.ports.find((p) => p.id === supply.portId)!;
    const a = currents.get(path.circuitIds[0]!) ?? 0;
    const m = portMOhm(bank, port);
    if (m > 0) {
      segments.push({ circuitId: "", name: `${bank.name} ${port.name} (BMS)`, currentA: a, cableMOhm: 0, devicesMOhm: m, dropV: (a * m) / 1000 });
      dropV += (a * m) / 1000;
    }
  }
  for (const cid of path.circuitIds) {
    const c = byId.get(cid)!;
    const a = currents.get(cid) ?? 0;
    const { cableMOhm, devicesMOhm } = circuitMOhm(model, c);
    const v = (a * (cableMOhm + devicesMOhm)) / 1000;
    segments.push({ circuitId: cid, name: c.name, currentA: a, cableMOhm, devicesMOhm, dropV: v });
    dropV += v;
  }
  const last = byId.get(path.circuitIds[path.circuitIds.length - 1]!)!;
  const limitPct = voltageDropLimitPct(last.criticality);
  const dropPct = (100 * dropV) / voltageV;
  return {
    loadId,
    name: load.name,
    dropV,
    dropPct,
    limitPct,
    ok: dropPct <= limitPct,
    segments,
    how: how(
      "V_drop = Σ over the path I_segment × (R_cable(2L) + R_fuse/breaker + R_switches + R_terminations) + I_port × R_BMS; % = V_drop / V_nominal",
      { segments: segments.map((s) => `${s.name}: ${r(s.currentA, 2)} A × ${r(s.cableMOhm + s.devicesMOhm, 2)} mΩ`).join("; "), nominalV: voltageV, limitPct },
      `Currents: the loads switched on now, split between paralleled banks on the bank feeders. Cable resistance at 30 °C (NEC Ch. 9 Table 8 / IEC 60228). ${RESISTANCE_SOURCE}`,
    ),
  };
}

/** Every finding for the graph's positions and a plan, worst first. */
export function auditFindings(model: RigModel, graph: CircuitGraph, plan: PlanInput): { findings: Finding[]; endToEnd: EndToEndDrop[] } {
  const sol = solveState(model, graph, plan);
  const findings: Finding[] = [];
  const banks = new Map(model.banks.map((b) => [b.id, b]));
  const netHasSource = sol.nets.map((n) => n.sourceIds.length > 0);
  const charged = (bankId: string) => sol.nets.some((n, i) => netHasSource[i] && n.banks.some((b) => b.bankId === bankId));

  // Backdoor charging.
  for (const net of sol.nets) {
    if (net.current !== "dc") continue;
    for (const k of net.nodes) {
      if (!k.startsWith("bank:")) continue;
      const [bankId, portId] = k.slice(5).split("/") as [string, string];
      const bank = banks.get(bankId)!;
      const port = bank.ports.find((p) => p.id === portId)!;
      if (bank.chemistry !== "lifepo4" || port.chargeProtected) continue;
      const others = net.banks.filter((b) => b.bankId !== bankId && charged(b.bankId));
      if (net.sourceIds.length === 0 && others.length === 0) continue;
      const viaSource = net.sourceIds.length > 0;
      const srcA = net.sourceIds.reduce((s, id) => s + sourceA(model, id, net.voltageV), 0);
      const names = viaSource
        ? net.sourceIds.map((id) => model.sources.find((s) => s.id === id)?.name ?? id)
        : others.map((o) => banks.get(o.bankId)!.name);
      findings.push({
        id: `backdoor-charging:${bankId}/${portId}`,
        kind: "backdoor-charging",
        severity: "danger",
        title: viaSource
          ? `Backdoor charging: ${names.join(", ")} can charge ${bank.name} through its ${port.name.toLowerCase()}`
          : `Backdoor charging: ${bank.name}'s ${port.name.toLowerCase()} is paralleled with ${names.join(", ")} while they charge`,
        why: viaSource
          ? `The ${port.name.toLowerCase()} has no charge protection: current from a charger on this bus bypasses the BMS's high-voltage and cold-charge cut-offs.`
          : `${names.join(", ")} ${others.length > 1 ? "are" : "is"} charged elsewhere, so ${others.length > 1 ? "they rise" : "it rises"} above ${bank.name} and push${others.length > 1 ? "" : "es"} current into its ${port.name.toLowerCase()}, past the BMS's charge protection.`,
        numbers: viaSource ? { sourceMaxA: r(srcA, 1), netVoltageV: net.voltageV } : { paralleledBanks: others.length + 1, netVoltageV: net.voltageV },
        how: how(
          "a live port without charge protection on a LiFePO4 bank shares a net (bank ports, buses, sources joined by conducting circuits) with a charge source, or with another bank that a source charges",
          { bank: bank.name, port: port.name, sources: net.sourceIds.join(", ") || "none", otherBanks: others.map((o) => o.bankId).join(", ") || "none" },
        ),
        standard: "Trade practice for split-port BMS batteries (makers' instructions): charge only through the charge port; keep chargers and other batteries off the load port, or isolate them with a DC-DC charger or a diode isolator.",
        caution: FINDING_CAUTION,
        subjectIds: [bankId, ...net.sourceIds, ...others.map((o) => o.bankId)],
      });
    }
  }

  // Mixed chemistries paralleled on one net.
  for (const net of sol.nets) {
    if (net.banks.length < 2) continue;
    const chems = [...new Set(net.banks.map((b) => banks.get(b.bankId)!.chemistry))];
    if (chems.length < 2) continue;
    const liAndLead = chems.includes("lifepo4") && chems.some((c) => isLeadAcid(c));
    findings.push({
      id: `mixed-chemistry:${net.banks.map((b) => b.bankId).sort().join("+")}`,
      kind: "mixed-chemistry",
      severity: liAndLead ? "warning" : "notice",
      title: `${listWords(net.banks.map((b) => banks.get(b.bankId)!.name))} (${chems.join(", ")}) are paralleled with no charger or isolator between them`,
      why: liAndLead
        ? "Lithium and lead-acid batteries need different charge voltages and rest at different voltages: paralleled, the lithium bank drains into the lead-acid one, the lead-acid one is never fully charged and the split of the load is unpredictable."
        : "Lead-acid types differ in charge and float voltage: paralleled, one is over- or under-charged.",
      numbers: Object.fromEntries(net.banks.map((b) => [`${b.bankId}SharePct`, r(100 * b.share, 1)])),
      how: how("banks of different chemistries whose ports share one net in the present switch positions", { chemistries: chems.join(", "), splitRule: net.splitRule }),
      standard: "Trade practice: separate banks of different chemistry with a DC-DC charger (or a battery isolator for lead-acid pairs), as battery makers instruct.",
      caution: FINDING_CAUTION,
      subjectIds: net.banks.map((b) => b.bankId),
    });
  }

  // Loads outside low-voltage protection in the present positions, with the standby avoided.
  const nowStandby = sol.standbyBmsW;
  for (const id of sol.loadsOn) {
    const feed = sol.loads[id]!;
    if (!feed.powered || feed.drainsBankIds.length === 0) continue;
    const load = model.loads.find((l) => l.id === id)!;
    // The cheapest protected alternative: a path from a protected port, its BMS state's standby.
    let extraW: number | null = null;
    for (const p of graph.paths.loads[id] ?? []) {
      if (p.supply.kind !== "bank" || !p.lowVoltageProtected) continue;
      const supply = p.supply;
      const bank = banks.get(supply.bankId)!;
      const req = portRequires(bank, supply.portId);
      if (req === null) continue;
      const at = { ...sol.at };
      for (const s of req) at[s.switchId] = s.position;
      // Every bank whose BMS shares those controls moves with them.
      let w = 0;
      for (const b of model.banks) w += bmsStateFor(b, at).standbyW;
      const extra = Math.max(0, w - nowStandby);
      if (extraW === null || extra < extraW) extraW = extra;
    }
    const drains = feed.drainsBankIds.map((b) => banks.get(b)!.name);
    findings.push({
      id: `outside-protection:${id}`,
      kind: "outside-protection",
      severity: load.essential ? "warning" : "notice",
      title: `${load.name} is outside low-voltage protection in the present positions`,
      why: `It is fed from ${drains.join(", ")} through a port the BMS does not open at the cutoff: left on, it can flatten ${drains.length > 1 ? "those banks" : "that bank"} past the cutoff.${extraW === null ? " No protected path exists in the wiring." : extraW > 0 ? ` The protected path would cost ${r(extraW, 2)} W more standby (${r(extraW * 24, 0)} Wh/day) to keep the load output engaged: that is the standby this wiring avoids.` : " The protected path costs no extra standby now: the load output is already engaged."}`,
      numbers: { standbyAvoidedW: extraW === null ? "no protected path" : r(extraW, 2), standbyAvoidedWhPerDay: extraW === null ? "no protected path" : r(extraW * 24, 1) },
      how: how(
        "outside = a bank on the load's net has no low-voltage protection on its port there; standby avoided = Σ BMS standby with the protected path's BMS controls set − Σ BMS standby now",
        { drainsBanks: feed.drainsBankIds.join(", "), bmsStandbyNowW: r(nowStandby, 2) },
      ),
      standard: "ABYC E-11 / ISO 13297 practice: keep loads behind the bank's low-voltage disconnect unless they must stay live (alarms, heater cool-down); the owner's trade-off.",
      caution: FINDING_CAUTION,
      subjectIds: [id, ...feed.drainsBankIds],
    });
  }

  // End-to-end voltage drop.
  const currents = circuitCurrents(model, graph, plan, sol);
  const endToEnd: EndToEndDrop[] = [];
  for (const id of sol.loadsOn) {
    const feed = sol.loads[id]!;
    const load = model.loads.find((l) => l.id === id)!;
    if (!feed.powered || !feed.path || load.current === "ac" || feed.path.inverterIds.length) continue;
    const d = endToEndDrop(model, id, feed.path, currents, feed.voltageV);
    endToEnd.push(d);
    if (d.ok) continue;
    findings.push({
      id: `end-to-end-drop:${id}`,
      kind: "end-to-end-drop",
      severity: "warning",
      title: `${load.name}: ${r(d.dropPct, 1)} % drop from the bank to the load (limit ${d.limitPct} %)`,
      why: "Each cable may pass on its own, but the load sees the sum of every cable, fuse, switch and termination in series: too low a voltage makes compressors stall, pumps labour and electronics reset.",
      numbers: { dropV: r(d.dropV, 3), dropPct: r(d.dropPct, 2), limitPct: d.limitPct, segments: d.segments.length },
      how: d.how,
      standard: "33 CFR 183.425 / ABYC E-11 practice: 3 % for critical loads (panel feeders, pumps, electronics), 10 % for others.",
      caution: FINDING_CAUTION,
      subjectIds: [id, ...feed.path.circuitIds],
    });
  }

  // Changeovers with no position.
  for (const swId of sol.unknownChangeovers) {
    const sw = model.switches.find((s) => s.id === swId)!;
    const cut = model.loads.filter((l) => (graph.paths.loads[l.id] ?? []).some((p) => p.steps.some((s) => s.deviceId === swId)) && !sol.loads[l.id]!.powered).map((l) => l.name);
    findings.push({
      id: `changeover-no-position:${swId}`,
      kind: "changeover-no-position",
      severity: "warning",
      title: `${sw.name} has no recorded position`,
      why: `The engine takes it as "${sw.positions.includes("off") ? "off" : sw.positions[0]}" rather than guess a side${cut.length ? `: ${cut.join(", ")} ${cut.length > 1 ? "count" : "counts"} as unpowered` : ""}. Record where it stands (or its normal position in the model) so protection and standby are judged on the real side.`,
      numbers: { positions: sw.positions.join(" / "), loadsUnpowered: cut.length },
      how: how("a changeover with no position in the rig state and no normal position in the model", { switch: sw.name }),
      standard: "Tilldawn practice: every switch has a known position.",
      caution: FINDING_CAUTION,
      subjectIds: [swId],
    });
  }

  findings.sort((a, b) => SEVERITY_RANK[a.severity] - SEVERITY_RANK[b.severity] || KIND_RANK[a.kind] - KIND_RANK[b.kind] || a.id.localeCompare(b.id));
  return { findings, endToEnd };
}
