/**
 * The rig model document: one JSON document per rig revision, validated here and shared by
 * the server (jsonb, append-only revisions), the phone (offline store) and the API.
 *
 * Conventions
 * - Every object has a stable string `id` (unique across the whole document, except bank
 *   ports, which are unique within their bank) and a human `name`. References are by id.
 * - Numbers carry their unit in the field name (capacityAh, standbyW, lengthM, ratingA…).
 * - Wiring is a directed graph. Nodes are bank ports, buses, charge sources, inverters and
 *   loads; every edge is a `circuit` from → to in the direction power flows when the bank
 *   discharges (bank port → bus → load; source → bus; bus → inverter; inverter → AC bus).
 *   A circuit carries its protection (fuse or breaker), the switches in it (with the position
 *   each must be in for the circuit to conduct) and its cable.
 * - A changeover (three-way) switch is one switch with several positions, referenced by two
 *   or more circuits that feed the same bus, each requiring a different position.
 * - Version 2: charge sources reach a bank only through circuits (source → bus or bank port);
 *   a bank's BMS has states (which ports are live, standby W each) chosen by switch positions;
 *   protections, switches, BMS ports and terminations may carry a resistance (mΩ); every
 *   switch may give its normal position. See DEVELOPERS.md, "Rig model version 2".
 * - Times of day are local to the rig's IANA time zone, in decimal hours 0–24.
 *
 * The schema deliberately uses no transforms or refinements so that it converts to JSON
 * Schema as is; semantic and referential checks live in `validateModel`.
 */
import { z } from "zod";
import { issuesOf, type Issue } from "./issues";

export const SCHEMA_VERSION = 2 as const;

const id = z.string().min(1).max(100);
const name = z.string().min(1).max(200);
const nonNeg = z.number().finite().min(0);
const pct = z.number().finite().min(0).max(100);
const hourOfDay = z.number().finite().min(0).max(24);

export const chemistrySchema = z.enum(["lifepo4", "agm", "flooded", "gel"]);
export type Chemistry = z.infer<typeof chemistrySchema>;

/** A daily time window in local hours; endH < startH wraps past midnight (e.g. 20 → 7). */
export const timeWindowSchema = z.object({
  startH: hourOfDay,
  endH: hourOfDay,
});
export type TimeWindow = z.infer<typeof timeWindowSchema>;

/* ------------------------------------------------------------------- BMS */

export const bmsStateSchema = z.object({
  /** e.g. "asleep", "on", "engaged". */
  id,
  name,
  /** Standby draw of the bank's electronics in this state (the whole draw, not an extra). */
  standbyW: nonNeg,
  /** Ports that conduct in this state. */
  livePorts: z.array(id).max(4),
  /** Switch positions that put the BMS in this state (all must hold). */
  requires: z.array(z.object({ switchId: id, position: z.string().min(1).max(40) })).max(8),
});
export type BmsState = z.infer<typeof bmsStateSchema>;

export const bmsSchema = z.object({
  name,
  location: z.string().max(200).optional(),
  /** From the resting state (first, no requirements) up: the BMS is in the LAST state whose
   * requirements all hold. */
  states: z.array(bmsStateSchema).min(1).max(6),
});
export type Bms = z.infer<typeof bmsSchema>;

/* ------------------------------------------------------------------ banks */

export const bankPortSchema = z.object({
  id,
  name,
  /** "common": one port for charge and load; "load"/"charge": a BMS with split ports. */
  role: z.enum(["common", "load", "charge"]),
  /** The BMS (or a low-voltage disconnect) opens this port at the cutoff. */
  lowVoltageProtected: z.boolean(),
  /** The BMS stops charge current through this port at its limits (full, cold, cell high).
   * A lithium bank's port without it is a backdoor when charge current can reach it. */
  chargeProtected: z.boolean(),
  /** The port switches through the BMS's load contactor/relay (live only in BMS states that
   * list it; resistance default of a contactor). */
  contactor: z.boolean(),
  /** Resistance of the BMS switch in this port (contactor or MOSFETs), mΩ; default per kind. */
  resistanceMOhm: nonNeg.optional(),
});
export type BankPort = z.infer<typeof bankPortSchema>;

export const bankSchema = z.object({
  id,
  name,
  role: z.enum(["house", "auxiliary", "starter"]),
  chemistry: chemistrySchema,
  /** Rated capacity of ONE battery; C20 (20-hour rate) for lead-acid. */
  ratedAh: z.number().finite().positive(),
  /** The hour rate at which ratedAh is given (20 for C20). Default 20. */
  ratedHourRateH: z.number().finite().positive().optional(),
  /** Nominal voltage of ONE battery (12.8 for a 4-cell LiFePO4, 12 for lead-acid). */
  batteryNominalV: z.number().finite().positive(),
  seriesCount: z.number().int().min(1).max(16),
  parallelCount: z.number().int().min(1).max(32),
  /** Lowest SoC the owner plans to use (e.g. 50 % lead-acid, 10–20 % LiFePO4). */
  usableFloorSocPct: pct,
  /** Bank voltage at which the BMS or low-voltage disconnect opens. */
  lowVoltageCutoffV: z.number().finite().positive(),
  /** Peukert exponent; default per chemistry when absent. */
  peukertExponent: z.number().finite().min(1).max(2).optional(),
  /** Coulombic/energy charge efficiency; default per chemistry when absent. */
  chargeEfficiencyPct: z.number().finite().min(50).max(100).optional(),
  /** Internal resistance of the whole bank, mΩ (maker's datasheet). Used to split a shared
   * bus's current between paralleled banks; by capacity when any bank on the bus lacks it. */
  internalResistanceMOhm: z.number().finite().positive().max(10000).optional(),
  /** The bank's BMS or low-voltage disconnect; absent: no electronics, every port always live. */
  bms: bmsSchema.optional(),
  /** Present capacity as a % of rated, e.g. from the logbook. Default 100. */
  healthPct: z.number().finite().min(1).max(150).optional(),
  ports: z.array(bankPortSchema).min(1).max(4),
});
export type Bank = z.infer<typeof bankSchema>;

/* ---------------------------------------------------------- charge sources */

/** A source's output reaches banks through the circuits that start at it (version 2). */
const sourceBase = {
  id,
  name,
};

export const solarSourceSchema = z.object({
  ...sourceBase,
  kind: z.literal("solar"),
  peakW: z.number().finite().positive(),
  /** Tilt from horizontal, 0 = flat roof. */
  tiltDeg: z.number().finite().min(0).max(90),
  /** Compass direction the panel faces, 0 = north, 90 = east, 180 = south. */
  azimuthDeg: z.number().finite().min(0).max(360),
  controller: z.enum(["mppt", "pwm"]),
  /** System losses before the controller (PVWatts v5 default 14.08 % when absent). */
  lossesPct: pct.optional(),
  /** Power temperature coefficient, %/°C (typical −0.35 to −0.45). Default −0.37. */
  tempCoeffPctPerC: z.number().finite().min(-1).max(0).optional(),
  /** Controller output limit. */
  maxChargeA: nonNeg.optional(),
});

export const chargerSourceSchema = z.object({
  ...sourceBase,
  /** shore: mains charger; alternator: direct/split charge; dcdc: DC-DC charger from the
   * alternator; generator: charger run from a generator; charger: battery-to-battery charger
   * drawing from `supplyBankId`. */
  kind: z.enum(["shore", "alternator", "dcdc", "generator", "charger"]),
  /** Output current into the bank. */
  ratedA: z.number().finite().positive(),
  /** Input → output efficiency (used when it draws from another bank). Default 90. */
  efficiencyPct: z.number().finite().min(10).max(100).optional(),
  /** For kind "charger": the bank it draws from. */
  supplyBankId: id.optional(),
});

export const chargeSourceSchema = z.discriminatedUnion("kind", [
  solarSourceSchema,
  chargerSourceSchema,
]);
export type SolarSource = z.infer<typeof solarSourceSchema>;
export type ChargerSource = z.infer<typeof chargerSourceSchema>;
export type ChargeSource = z.infer<typeof chargeSourceSchema>;

/* --------------------------------------------------------------- inverters */

export const inverterSchema = z.object({
  id,
  name,
  ratedW: z.number().finite().positive(),
  surgeW: nonNeg.optional(),
  /** DC → AC efficiency near typical load. */
  efficiencyPct: z.number().finite().min(10).max(100),
  /** DC draw while on with no AC load. */
  idleW: nonNeg,
  /** DC draw while switched off (remote standby). Default 0. */
  offW: nonNeg.optional(),
  /** AC output voltage (120 or 230). Default 230. */
  acNominalV: z.number().finite().positive().max(400).optional(),
});
export type Inverter = z.infer<typeof inverterSchema>;

/* ------------------------------------------------- buses, switches, fuses */

export const busSchema = z.object({
  id,
  name,
  current: z.enum(["dc", "ac"]),
});
export type Bus = z.infer<typeof busSchema>;

export const switchSchema = z.object({
  id,
  name,
  /** changeover: a three-way (or more) selector; positions name its settings.
   * enable/reset: BMS controls (they set BMS states and carry no load current). */
  kind: z.enum(["switch", "disconnect", "relay", "enable", "reset", "changeover"]),
  /** Positions in order, e.g. ["off", "on"] or ["off", "house", "starter"]. The "off" position
   * (or the first) is where "all off" puts it. */
  positions: z.array(z.string().min(1).max(40)).min(2).max(6),
  /** Where it normally stands when nobody has recorded a position (e.g. a breaker panel
   * switch that is always on). Absent: it follows the loads switched on (load switches,
   * enables), except a changeover, which then has no position (an audit finding). */
  normalPosition: z.string().min(1).max(40).optional(),
  /** A push button (reset): its position in the rig state records that it was operated. */
  momentary: z.boolean().optional(),
  /** Contact resistance when closed, mΩ; default per kind (app/engine/resistance.ts). */
  resistanceMOhm: nonNeg.optional(),
  /** Where a person finds it ("under the passenger seat"). */
  location: z.string().max(200).optional(),
});
export type Switch = z.infer<typeof switchSchema>;

export const protectionSchema = z.object({
  id,
  name,
  kind: z.enum(["fuse", "breaker"]),
  ratingA: z.number().finite().positive(),
  /** Cold resistance, mΩ; default from the rating (app/engine/resistance.ts). */
  resistanceMOhm: nonNeg.optional(),
  location: z.string().max(200).optional(),
});
export type Protection = z.infer<typeof protectionSchema>;

/* ---------------------------------------------------------------- circuits */

export const awgSizes = [
  "18", "16", "14", "12", "10", "8", "6", "4", "3", "2", "1", "1/0", "2/0", "3/0", "4/0",
] as const;

export const cableSizeSchema = z.discriminatedUnion("unit", [
  z.object({ unit: z.literal("awg"), awg: z.enum(awgSizes) }),
  z.object({ unit: z.literal("mm2"), mm2: z.number().finite().positive().max(500) }),
]);
export type CableSize = z.infer<typeof cableSizeSchema>;

export const cableSchema = z.object({
  size: cableSizeSchema,
  /** One-way run; voltage drop uses the round trip (2 × length). */
  lengthM: z.number().finite().positive().max(1000),
  /** Conductor insulation temperature rating. */
  tempRatingC: z.union([
    z.literal(60), z.literal(75), z.literal(80), z.literal(90),
    z.literal(105), z.literal(125), z.literal(200),
  ]),
  /** Runs through an engine space (ampacity reduced). */
  engineSpace: z.boolean(),
});
export type Cable = z.infer<typeof cableSchema>;

export const nodeRefSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("bank"), id, port: id }),
  z.object({ kind: z.literal("bus"), id }),
  z.object({ kind: z.literal("source"), id }),
  z.object({ kind: z.literal("inverter"), id }),
  z.object({ kind: z.literal("load"), id }),
]);
export type NodeRef = z.infer<typeof nodeRefSchema>;

export const switchSettingSchema = z.object({
  switchId: id,
  /** The position this switch must be in for the circuit to conduct. */
  position: z.string().min(1).max(40),
});
export type SwitchSetting = z.infer<typeof switchSettingSchema>;

export const circuitSchema = z.object({
  id,
  name,
  from: nodeRefSchema,
  to: nodeRefSchema,
  protectionId: id.optional(),
  /** In the order a person meets them from the supply side. */
  switches: z.array(switchSettingSchema).max(8),
  cable: cableSchema.optional(),
  /** Crimped or bolted terminations in the circuit, both conductors (default 4). */
  terminations: z.number().int().min(0).max(40).optional(),
  /** Resistance of one termination, mΩ (default app/engine/resistance.ts). */
  terminationMOhm: nonNeg.optional(),
  /** Voltage-drop class: critical 3 %, normal 10 % (marine practice). */
  criticality: z.enum(["critical", "normal"]),
});
export type Circuit = z.infer<typeof circuitSchema>;

/* ------------------------------------------------------------------- loads */

export const loadSchema = z.object({
  id,
  name,
  current: z.enum(["dc", "ac"]),
  /** Running power; give powerW or currentA (at the bank's nominal voltage for DC). */
  powerW: nonNeg.optional(),
  currentA: nonNeg.optional(),
  /** Share of "on" time it actually draws (a fridge compressor cycles). Default 100. */
  dutyCyclePct: pct.optional(),
  /** Draw while switched off but still connected (e.g. a sat dish modem). Default 0. */
  standbyW: nonNeg.optional(),
  surgeW: nonNeg.optional(),
  essential: z.boolean(),
});
export type Load = z.infer<typeof loadSchema>;

/* ------------------------------------------------------------------- modes */

export const modeLoadSchema = z.object({
  loadId: id,
  /** Hours per day the load is on in this mode. */
  hoursPerDay: z.number().finite().min(0).max(24),
  /** When it is on; when absent its hours are spread evenly over the day. */
  windows: z.array(timeWindowSchema).max(6).optional(),
});
export type ModeLoad = z.infer<typeof modeLoadSchema>;

export const modeSourceSchema = z.object({
  sourceId: id,
  enabled: z.boolean(),
  /** When a non-solar source charges (a drive, a generator run, shore power); absent = all day. */
  windows: z.array(timeWindowSchema).max(6).optional(),
});
export type ModeSource = z.infer<typeof modeSourceSchema>;

export const modeSchema = z.object({
  id,
  name,
  loads: z.array(modeLoadSchema).max(500),
  /** Inverters switched on in this mode. */
  inverterIdsOn: z.array(id).max(10),
  /** Non-solar sources are off unless listed enabled; solar is on unless listed disabled. */
  sources: z.array(modeSourceSchema).max(20),
});
export type Mode = z.infer<typeof modeSchema>;

/* -------------------------------------------------------------------- rig */

export const rigModelSchema = z.object({
  schemaVersion: z.literal(SCHEMA_VERSION),
  id,
  name,
  home: z.object({
    latDeg: z.number().finite().min(-90).max(90),
    lonDeg: z.number().finite().min(-180).max(180),
    elevationM: z.number().finite().min(-500).max(9000).optional(),
  }),
  /** IANA time zone, e.g. "America/Denver". */
  timeZone: z.string().min(1).max(64),
  banks: z.array(bankSchema).min(1).max(8),
  sources: z.array(chargeSourceSchema).max(20),
  inverters: z.array(inverterSchema).max(10),
  buses: z.array(busSchema).max(100),
  switches: z.array(switchSchema).max(200),
  protections: z.array(protectionSchema).max(300),
  circuits: z.array(circuitSchema).max(500),
  loads: z.array(loadSchema).max(300),
  modes: z.array(modeSchema).min(1).max(20),
});
export type RigModel = z.infer<typeof rigModelSchema>;

/* ---------------------------------------------------------- migration */

/**
 * Upgrade a stored document to the current schema version, step by step (0 → 1 → 2).
 * Unknown future versions are returned unchanged (validation will then reject them).
 *
 * Version 0 is the unversioned early draft format: a bank had one `nominalV` for the whole
 * bank instead of per-battery voltage and series count, and no bank ports.
 *
 * Version 1 → 2 (see DEVELOPERS.md):
 * - a source's `bankId` becomes a circuit source → bank port (the charge port, else the common
 *   port) unless a circuit from that source already exists;
 * - a bank's `standbyAlwaysW` / `standbyContactorW` become BMS states: "on" (ports without a
 *   contactor, the always-on draw) and, with a contactor port, "engaged" (every port, both
 *   draws). "Engaged" requires the enable switches found on the contactor port's circuits; where
 *   there is none, a new enable switch "<bank> load output" is added. Version 1 inferred the
 *   contactor from the loads on; v2 resolves an unrecorded enable the same way (it follows the
 *   loads), so budgets are unchanged;
 * - ports get `chargeProtected` (charge and LiFePO4 common ports yes, load ports no);
 * - a changeover gets as its normal position the one version 1 assumed (the side fed from a
 *   house bank, else its first position that is not "off"), so runways are unchanged; the
 *   owner should confirm it.
 */
export function migrateModel(doc: unknown): unknown {
  if (!isRecord(doc)) return doc;
  let out: Record<string, unknown> = doc;
  if ((out.schemaVersion ?? 0) === 0) out = migrate0to1(out);
  if (out.schemaVersion === 1) out = migrate1to2(out);
  return out;
}

function migrate0to1(doc: Record<string, unknown>): Record<string, unknown> {
  const banks = Array.isArray(doc.banks) ? doc.banks : [];
  return {
    ...doc,
    schemaVersion: 1,
    banks: banks.map((b: unknown) => {
      if (!isRecord(b)) return b;
      const { nominalV, ...rest } = b;
      const out: Record<string, unknown> = { ...rest };
      if (out.batteryNominalV === undefined && typeof nominalV === "number") {
        out.batteryNominalV = nominalV;
      }
      out.seriesCount ??= 1;
      out.parallelCount ??= 1;
      out.standbyAlwaysW ??= 0;
      out.standbyContactorW ??= 0;
      out.ports ??= [
        { id: "main", name: "Main", role: "common", lowVoltageProtected: false, contactor: false },
      ];
      return out;
    }),
  };
}

const arr = (v: unknown): unknown[] => (Array.isArray(v) ? v : []);

function migrate1to2(doc: Record<string, unknown>): Record<string, unknown> {
  const circuits = arr(doc.circuits).map((c) => (isRecord(c) ? { ...c } : c)) as Record<string, unknown>[];
  const switches = arr(doc.switches).map((s) => (isRecord(s) ? { ...s } : s)) as Record<string, unknown>[];
  const ids = new Set<string>();
  for (const key of ["banks", "sources", "inverters", "buses", "switches", "protections", "circuits", "loads", "modes"]) {
    for (const o of arr(doc[key])) if (isRecord(o) && typeof o.id === "string") ids.add(o.id);
  }
  const freshId = (base: string): string => {
    let idOut = base;
    for (let n = 2; ids.has(idOut); n++) idOut = `${base}-${n}`;
    ids.add(idOut);
    return idOut;
  };
  const switchById = new Map(switches.filter(isRecord).map((s) => [s.id, s]));
  const bankById = new Map(arr(doc.banks).filter(isRecord).map((b) => [b.id as string, b]));

  const banks = arr(doc.banks).map((b) => {
    if (!isRecord(b)) return b;
    const { standbyAlwaysW, standbyContactorW, ...rest } = b;
    const always = typeof standbyAlwaysW === "number" ? standbyAlwaysW : 0;
    const extra = typeof standbyContactorW === "number" ? standbyContactorW : 0;
    const ports = arr(b.ports).map((p) => {
      if (!isRecord(p)) return p;
      const chargeProtected = p.chargeProtected ?? (p.role === "charge" || (p.role === "common" && b.chemistry === "lifepo4"));
      return { ...p, chargeProtected };
    }) as Record<string, unknown>[];
    const contactorPorts = ports.filter((p) => isRecord(p) && p.contactor === true).map((p) => p.id as string);
    const out: Record<string, unknown> = { ...rest, ports };
    if (always > 0 || extra > 0 || contactorPorts.length > 0) {
      const allPorts = ports.map((p) => p.id as string);
      const states: unknown[] = [
        { id: "on", name: "On", standbyW: always, livePorts: allPorts.filter((p) => !contactorPorts.includes(p)), requires: [] },
      ];
      if (contactorPorts.length > 0) {
        // The enables on the contactor ports' circuits drive the engaged state.
        const requires: { switchId: string; position: string }[] = [];
        for (const c of circuits) {
          const from = isRecord(c) ? c.from : undefined;
          if (!isRecord(from) || from.kind !== "bank" || from.id !== b.id || !contactorPorts.includes(from.port as string)) continue;
          const kept: unknown[] = [];
          for (const st of arr(c.switches)) {
            const sw = isRecord(st) ? switchById.get(st.switchId as string) : undefined;
            if (sw && sw.kind === "enable" && isRecord(st)) {
              if (!requires.some((r) => r.switchId === st.switchId)) requires.push({ switchId: st.switchId as string, position: st.position as string });
            } else kept.push(st);
          }
          c.switches = kept;
        }
        if (requires.length === 0) {
          const swId = freshId(`${String(b.id)}-load-output`);
          const sw = { id: swId, name: `${String(b.name)} load output`, kind: "enable", positions: ["off", "on"], location: "On the battery's BMS" };
          switches.push(sw);
          switchById.set(swId, sw);
          requires.push({ switchId: swId, position: "on" });
        }
        states.push({ id: "engaged", name: "Load output engaged", standbyW: always + extra, livePorts: allPorts, requires });
      }
      out.bms = { name: `${String(b.name)} BMS`, states };
    }
    return out;
  });

  // Sources: bankId → a circuit to the bank's charge (or common) port.
  const sources = arr(doc.sources).map((s) => {
    if (!isRecord(s)) return s;
    const { bankId, ...rest } = s;
    const wired = circuits.some((c) => isRecord(c) && isRecord(c.from) && c.from.kind === "source" && c.from.id === s.id);
    const bank = typeof bankId === "string" ? bankById.get(bankId) : undefined;
    if (!wired && bank) {
      const ports = arr(bank.ports).filter(isRecord);
      const port = ports.find((p) => p.role === "charge") ?? ports.find((p) => p.role === "common") ?? ports[0];
      if (port) {
        circuits.push({
          id: freshId(`${String(s.id)}-output`),
          name: `${String(s.name)} output`,
          from: { kind: "source", id: s.id },
          to: { kind: "bank", id: bankId, port: port.id },
          switches: [],
          criticality: "normal",
        });
      }
    }
    return rest;
  });

  // Changeovers: the position version 1 assumed (the side a house bank feeds).
  const houseBanks = new Set(arr(doc.banks).filter((b) => isRecord(b) && b.role === "house").map((b) => (b as Record<string, unknown>).id));
  const incoming = new Map<string, Record<string, unknown>[]>();
  const keyOf = (ref: unknown): string => (isRecord(ref) ? `${String(ref.kind)}:${String(ref.id)}` : "");
  for (const c of circuits) if (isRecord(c)) (incoming.get(keyOf(c.to)) ?? incoming.set(keyOf(c.to), []).get(keyOf(c.to))!).push(c);
  const fromHouse = (c: Record<string, unknown>): boolean => {
    const seen = new Set<string>();
    const stack = [c];
    while (stack.length) {
      const x = stack.pop()!;
      if (isRecord(x.from) && x.from.kind === "bank") { if (houseBanks.has(x.from.id)) return true; continue; }
      const k = keyOf(x.from);
      if (seen.has(k)) continue;
      seen.add(k);
      stack.push(...(incoming.get(k) ?? []));
    }
    return false;
  };
  for (const sw of switches) {
    if (!isRecord(sw) || sw.kind !== "changeover" || sw.normalPosition !== undefined) continue;
    const uses = circuits.filter(isRecord).flatMap((c) => arr(c.switches).filter((x) => isRecord(x) && x.switchId === sw.id).map((x) => ({ c, position: (x as Record<string, unknown>).position as string })));
    const house = uses.find((u) => fromHouse(u.c));
    const pos = house?.position ?? arr(sw.positions).find((p) => p !== "off");
    if (typeof pos === "string") sw.normalPosition = pos;
  }
  return { ...doc, schemaVersion: 2, banks, sources, switches, circuits };
}

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

/* --------------------------------------------------------- validation */

export type ModelIssue = Issue;
export type ValidateResult =
  | { ok: true; model: RigModel }
  | { ok: false; issues: ModelIssue[] };

/**
 * Parse a document (after migration) and check its references: unknown ids, duplicate ids,
 * invalid switch positions, cycles in the wiring and loads that no bank or source feeds.
 * Never throws.
 */
export function validateModel(doc: unknown): ValidateResult {
  try {
    const parsed = rigModelSchema.safeParse(migrateModel(doc));
    if (!parsed.success) {
      return {
        ok: false,
        issues: issuesOf(parsed.error),
      };
    }
    const issues = checkReferences(parsed.data);
    return issues.length ? { ok: false, issues } : { ok: true, model: parsed.data };
  } catch (err) {
    return { ok: false, issues: [{ path: [], message: `Model could not be read: ${String(err)}` }] };
  }
}

/** Graph node key, e.g. "bank:house/load", "bus:main". */
export function nodeKey(ref: NodeRef): string {
  return ref.kind === "bank" ? `bank:${ref.id}/${ref.port}` : `${ref.kind}:${ref.id}`;
}

function checkReferences(m: RigModel): ModelIssue[] {
  const issues: ModelIssue[] = [];
  const names = new Map<string, string>();
  const collections = [
    ["banks", m.banks], ["sources", m.sources], ["inverters", m.inverters], ["buses", m.buses],
    ["switches", m.switches], ["protections", m.protections], ["circuits", m.circuits],
    ["loads", m.loads], ["modes", m.modes],
  ] as const;
  for (const [key, list] of collections) {
    list.forEach((o, i) => {
      const seen = names.get(o.id);
      if (seen !== undefined) {
        issues.push({ path: [key, i, "id"], message: `Id "${o.id}" of ${o.name} is already used by ${seen}` });
      } else names.set(o.id, o.name);
    });
  }
  const banks = new Map(m.banks.map((b) => [b.id, b]));
  const sources = new Map(m.sources.map((s) => [s.id, s]));
  const inverters = new Map(m.inverters.map((x) => [x.id, x]));
  const buses = new Map(m.buses.map((x) => [x.id, x]));
  const switches = new Map(m.switches.map((x) => [x.id, x]));
  const protections = new Map(m.protections.map((x) => [x.id, x]));
  const loads = new Map(m.loads.map((x) => [x.id, x]));
  m.switches.forEach((sw, i) => {
    if (sw.normalPosition !== undefined && !sw.positions.includes(sw.normalPosition)) {
      issues.push({ path: ["switches", i, "normalPosition"], message: `${sw.name} has no position "${sw.normalPosition}" (has ${sw.positions.join(", ")})` });
    }
  });

  try {
    new Intl.DateTimeFormat("en-US", { timeZone: m.timeZone });
  } catch {
    issues.push({ path: ["timeZone"], message: `Unknown time zone "${m.timeZone}"` });
  }

  m.banks.forEach((b, i) => {
    const portIds = new Set<string>();
    b.ports.forEach((p, j) => {
      if (portIds.has(p.id)) issues.push({ path: ["banks", i, "ports", j, "id"], message: `Port id "${p.id}" repeats in ${b.name}` });
      portIds.add(p.id);
    });
    const roles = b.ports.map((p) => p.role);
    if (roles.includes("common") && b.ports.length > 1) {
      issues.push({ path: ["banks", i, "ports"], message: `${b.name} has a common port and other ports; use either one common port or split load and charge ports` });
    }
    b.bms?.states.forEach((st, j) => {
      st.livePorts.forEach((p, k) => {
        if (!portIds.has(p)) issues.push({ path: ["banks", i, "bms", "states", j, "livePorts", k], message: `${b.name}: BMS state ${st.name} lists unknown port "${p}"` });
      });
      st.requires.forEach((rq, k) => {
        const sw = switches.get(rq.switchId);
        if (!sw) issues.push({ path: ["banks", i, "bms", "states", j, "requires", k, "switchId"], message: `${b.name}: BMS state ${st.name} needs unknown switch "${rq.switchId}"` });
        else if (!sw.positions.includes(rq.position)) issues.push({ path: ["banks", i, "bms", "states", j, "requires", k, "position"], message: `${b.name}: switch ${sw.name} has no position "${rq.position}"` });
      });
    });
    if (b.bms && b.bms.states[0]!.requires.length > 0) {
      issues.push({ path: ["banks", i, "bms", "states", 0, "requires"], message: `${b.name}: the BMS's first state is its resting state and needs no switch` });
    }
    const nominal = b.batteryNominalV * b.seriesCount;
    if (b.lowVoltageCutoffV >= nominal * 1.15 || b.lowVoltageCutoffV <= nominal * 0.5) {
      issues.push({ path: ["banks", i, "lowVoltageCutoffV"], message: `${b.name}: cutoff ${b.lowVoltageCutoffV} V does not fit a ${nominal} V bank` });
    }
  });

  m.sources.forEach((s, i) => {
    if (s.kind !== "solar" && s.supplyBankId !== undefined) {
      if (!banks.has(s.supplyBankId)) issues.push({ path: ["sources", i, "supplyBankId"], message: `${s.name} draws from unknown bank "${s.supplyBankId}"` });
      else if (m.circuits.some((c) => c.from.kind === "source" && c.from.id === s.id && c.to.kind === "bank" && c.to.id === s.supplyBankId)) {
        issues.push({ path: ["sources", i, "supplyBankId"], message: `${s.name} cannot charge the bank it draws from` });
      }
    }
  });

  m.loads.forEach((l, i) => {
    if (l.powerW === undefined && l.currentA === undefined) {
      issues.push({ path: ["loads", i], message: `${l.name} needs powerW or currentA` });
    }
  });

  const refExists = (ref: NodeRef): string | null => {
    switch (ref.kind) {
      case "bank": {
        const b = banks.get(ref.id);
        if (!b) return `unknown bank "${ref.id}"`;
        if (!b.ports.some((p) => p.id === ref.port)) return `${b.name} has no port "${ref.port}"`;
        return null;
      }
      case "bus": return buses.has(ref.id) ? null : `unknown bus "${ref.id}"`;
      case "source": return sources.has(ref.id) ? null : `unknown charge source "${ref.id}"`;
      case "inverter": return inverters.has(ref.id) ? null : `unknown inverter "${ref.id}"`;
      case "load": return loads.has(ref.id) ? null : `unknown load "${ref.id}"`;
    }
  };

  const edges = new Map<string, string[]>();
  const incoming = new Map<string, string[]>();
  m.circuits.forEach((c, i) => {
    let bad = false;
    for (const end of ["from", "to"] as const) {
      const err = refExists(c[end]);
      if (err) { issues.push({ path: ["circuits", i, end], message: `Circuit ${c.name}: ${err}` }); bad = true; }
    }
    if (c.from.kind === "load") { issues.push({ path: ["circuits", i, "from"], message: `Circuit ${c.name} starts at a load; loads only receive power` }); bad = true; }
    if (c.to.kind === "source") { issues.push({ path: ["circuits", i, "to"], message: `Circuit ${c.name} ends at a charge source; sources only supply power` }); bad = true; }
    if (c.protectionId !== undefined && !protections.has(c.protectionId)) {
      issues.push({ path: ["circuits", i, "protectionId"], message: `Circuit ${c.name}: unknown protection "${c.protectionId}"` });
    }
    c.switches.forEach((s, j) => {
      const sw = switches.get(s.switchId);
      if (!sw) issues.push({ path: ["circuits", i, "switches", j, "switchId"], message: `Circuit ${c.name}: unknown switch "${s.switchId}"` });
      else if (!sw.positions.includes(s.position)) {
        issues.push({ path: ["circuits", i, "switches", j, "position"], message: `Circuit ${c.name}: switch ${sw.name} has no position "${s.position}" (has ${sw.positions.join(", ")})` });
      }
    });
    if (bad) return;
    const a = nodeKey(c.from), b = nodeKey(c.to);
    if (a === b) { issues.push({ path: ["circuits", i], message: `Circuit ${c.name} connects ${a} to itself` }); return; }
    (edges.get(a) ?? edges.set(a, []).get(a)!).push(b);
    (incoming.get(b) ?? incoming.set(b, []).get(b)!).push(a);
    // Current kind checks.
    const toLoad = c.to.kind === "load" ? loads.get(c.to.id) : undefined;
    const fromBus = c.from.kind === "bus" ? buses.get(c.from.id) : undefined;
    if (toLoad && fromBus && toLoad.current !== fromBus.current) {
      issues.push({ path: ["circuits", i], message: `Circuit ${c.name}: ${toLoad.current.toUpperCase()} load ${toLoad.name} on ${fromBus.current.toUpperCase()} bus ${fromBus.name}` });
    }
  });

  // Cycles: iterative DFS with colours.
  const label = (key: string): string => {
    const [kind, rest = ""] = key.split(":") as [string, string?];
    const idPart = rest.split("/")[0] ?? rest;
    const n = names.get(idPart);
    return n ? `${n}${kind === "bank" ? ` (${rest.split("/")[1]} port)` : ""}` : key;
  };
  const colour = new Map<string, 1 | 2>();
  for (const start of edges.keys()) {
    if (colour.has(start)) continue;
    const stack: { node: string; i: number }[] = [{ node: start, i: 0 }];
    const path: string[] = [start];
    colour.set(start, 1);
    while (stack.length) {
      const top = stack[stack.length - 1]!;
      const next = edges.get(top.node)?.[top.i++];
      if (next === undefined) {
        colour.set(top.node, 2);
        stack.pop();
        path.pop();
        continue;
      }
      const c = colour.get(next);
      if (c === 1) {
        const loop = path.slice(path.indexOf(next)).concat(next).map(label);
        issues.push({ path: ["circuits"], message: `Wiring loop: ${loop.join(" → ")}` });
      } else if (c === undefined) {
        colour.set(next, 1);
        stack.push({ node: next, i: 0 });
        path.push(next);
      }
    }
  }

  // Loads fed by no bank or source.
  m.loads.forEach((l, i) => {
    const seen = new Set<string>();
    const queue = [nodeKey({ kind: "load", id: l.id })];
    let fed = false;
    while (queue.length && !fed) {
      const k = queue.pop()!;
      if (seen.has(k)) continue;
      seen.add(k);
      if (k.startsWith("bank:") || k.startsWith("source:")) { fed = true; break; }
      for (const up of incoming.get(k) ?? []) queue.push(up);
    }
    if (!fed) issues.push({ path: ["loads", i], message: `${l.name} is fed by no bank or charge source` });
  });

  // Modes.
  m.modes.forEach((mode, i) => {
    mode.loads.forEach((ml, j) => {
      if (!loads.has(ml.loadId)) issues.push({ path: ["modes", i, "loads", j, "loadId"], message: `Mode ${mode.name}: unknown load "${ml.loadId}"` });
    });
    mode.inverterIdsOn.forEach((x, j) => {
      if (!inverters.has(x)) issues.push({ path: ["modes", i, "inverterIdsOn", j], message: `Mode ${mode.name}: unknown inverter "${x}"` });
    });
    mode.sources.forEach((s, j) => {
      if (!sources.has(s.sourceId)) issues.push({ path: ["modes", i, "sources", j, "sourceId"], message: `Mode ${mode.name}: unknown charge source "${s.sourceId}"` });
    });
  });
  return issues;
}
