/**
 * POST /api/v1/projection: the request schema, a pure runner and the JSON Schema.
 * The route parses the body with `parseProjectionRequest`, answers 400 with the issues' paths
 * on failure and 200 with `runProjectionRequest`'s result otherwise.
 */
import { z } from "zod";
import { runAudit, type Audit } from "./audit";
import { autonomy, type Autonomy } from "./autonomy";
import { buildCircuitGraph, type SwitchStep } from "./circuit-graph";
import type { How } from "./explain";
import type { Budget } from "./draw";
import { issuesOf } from "./issues";
import { migrateModel, rigModelSchema, validateModel, type ModelIssue, type RigModel } from "./model";
import { runProjection, type BankProjection } from "./projection";
import { currentStateSchema, type CurrentState } from "./state";
import { planForDawn, type DawnPlan } from "./dawn-plan";
import { operationsFor, type LoadOperations } from "./operations";
import { presentPower, type PresentPower } from "./now";
import { mainBankId, type BankShare, type BmsStateNow, type ResolvedPosition } from "./solution";

export const projectionOptionsSchema = z.object({
  /** Hours to simulate, default 72. */
  horizonH: z.number().int().min(1).max(168).optional(),
  /** Step in minutes, default 5. */
  stepMin: z.number().int().min(1).max(60).optional(),
  /** Include the SoC curves (default true); false gives only the headline figures. */
  includeCurves: z.boolean().optional(),
  /** Margin the dawn plan must leave above the stop SoC at the next charge, % points (default 0). */
  dawnMarginSocPct: z.number().finite().min(0).max(50).optional(),
});

export const projectionRequestSchema = z.object({
  model: rigModelSchema,
  state: currentStateSchema,
  options: projectionOptionsSchema.optional(),
});
export type ProjectionRequest = z.infer<typeof projectionRequestSchema>;

export interface LoadGraphSummary {
  loadId: string;
  name: string;
  essential: boolean;
  bankId: string | null;
  via: string[];
  switchPath: SwitchStep[];
  switchCount: number;
  outsideLowVoltageProtection: boolean;
  drainsBankIds: string[];
  powered: boolean;
  bankShares: BankShare[];
  forcesStandby: { kind: string; id: string; name: string; w: number }[];
  how: How;
}

export interface ProjectionResult {
  /** Version of this answer's shape (2: solution, operations and findings added). */
  schemaVersion: 2;
  projection: {
    startMs: number;
    stepMin: number;
    horizonH: number;
    timesMs?: number[];
    nextSunriseMs: number | null;
    primaryBankId: string;
    banks: (Omit<BankProjection, "socPct"> & { socPct?: number[] })[];
  };
  budget: Budget;
  audit: Audit;
  circuitGraph: { loads: LoadGraphSummary[] };
  /** The electrical solution of the state: every switch's position, BMS states, nets. */
  solution: {
    positions: ResolvedPosition[];
    bms: BmsStateNow[];
    nets: { id: number; current: "dc" | "ac"; buses: string[]; banks: BankShare[]; sourceIds: string[]; splitRule: string; voltageV: number }[];
    standbyBmsW: number;
  };
  /** How to power each load from "all off" and from the present positions. */
  operations: { loadId: string; allOff: LoadOperations | null; now: LoadOperations | null }[];
  /** Draw and source power of each bank at the state's instant (the Now screen's figures). */
  present: (PresentPower & { bankId: string })[];
  /** The dawn plan when the verdict falls short (null when it passes). */
  dawnPlan: DawnPlan | null;
  autonomy: Autonomy[];
}

export type ParseResult<T> = { ok: true; value: T } | { ok: false; issues: ModelIssue[] };

/** Schema, referential and state checks. Never throws. */
export function parseProjectionRequest(body: unknown): ParseResult<ProjectionRequest> {
  try {
    // Version 0/1 model documents still import: migrate before the schema check.
    const input = typeof body === "object" && body !== null && !Array.isArray(body) && "model" in body
      ? { ...(body as Record<string, unknown>), model: migrateModel((body as Record<string, unknown>).model) }
      : body;
    const parsed = projectionRequestSchema.safeParse(input);
    if (!parsed.success) return { ok: false, issues: issuesOf(parsed.error) };
    const v = validateModel(parsed.data.model);
    if (!v.ok) return { ok: false, issues: v.issues.map((i) => ({ path: ["model", ...i.path], message: i.message })) };
    const issues = checkState(v.model, parsed.data.state);
    if (issues.length) return { ok: false, issues };
    return { ok: true, value: { ...parsed.data, model: v.model } };
  } catch (err) {
    return { ok: false, issues: [{ path: [], message: `Request could not be read: ${String(err)}` }] };
  }
}

function checkState(model: RigModel, state: CurrentState): ModelIssue[] {
  const issues: ModelIssue[] = [];
  if (!model.modes.some((m) => m.id === state.modeId)) issues.push({ path: ["state", "modeId"], message: `Unknown mode "${state.modeId}"` });
  const banks = new Set(model.banks.map((b) => b.id));
  state.banks.forEach((b, i) => {
    if (!banks.has(b.bankId)) issues.push({ path: ["state", "banks", i, "bankId"], message: `Unknown bank "${b.bankId}"` });
    if (b.socPct === undefined && b.restingV === undefined) issues.push({ path: ["state", "banks", i], message: "Give socPct or restingV" });
  });
  const loads = new Set(model.loads.map((l) => l.id));
  state.loadsOn?.forEach((id, i) => {
    if (!loads.has(id)) issues.push({ path: ["state", "loadsOn", i], message: `Unknown load "${id}"` });
  });
  const inverters = new Set(model.inverters.map((x) => x.id));
  state.inverterIdsOn?.forEach((id, i) => {
    if (!inverters.has(id)) issues.push({ path: ["state", "inverterIdsOn", i], message: `Unknown inverter "${id}"` });
  });
  const switches = new Map(model.switches.map((s) => [s.id, s]));
  for (const [id, pos] of Object.entries(state.switchPositions ?? {})) {
    const sw = switches.get(id);
    if (!sw) issues.push({ path: ["state", "switchPositions", id], message: `Unknown switch "${id}"` });
    else if (!sw.positions.includes(pos)) issues.push({ path: ["state", "switchPositions", id], message: `${sw.name} has no position "${pos}"` });
  }
  return issues;
}

/** Run everything for a parsed, validated request. Pure. */
export function runProjectionRequest(req: ProjectionRequest): ProjectionResult {
  const { model, state } = req;
  const graph = buildCircuitGraph(model, state.switchPositions);
  const projection = runProjection(model, graph, state, {
    ...(req.options?.horizonH !== undefined ? { horizonH: req.options.horizonH } : {}),
    ...(req.options?.stepMin !== undefined ? { stepMin: req.options.stepMin } : {}),
  });
  const curves = req.options?.includeCurves ?? true;
  const plan = { modeId: state.modeId, ...(state.loadsOn ? { loadsOn: state.loadsOn } : {}), ...(state.inverterIdsOn ? { inverterIdsOn: state.inverterIdsOn } : {}) };
  const sol = projection.budget.solution;
  const audit = runAudit(model, graph, plan);
  const loads: LoadGraphSummary[] = model.loads.map((l) => {
    const g = graph.loads[l.id]!;
    const f = sol.loads[l.id]!;
    return {
      loadId: l.id,
      name: l.name,
      essential: l.essential,
      bankId: mainBankId(f.bankShares),
      via: f.path?.via.map((v) => v.name) ?? [],
      switchPath: f.path?.steps ?? [],
      switchCount: f.path?.switchCount ?? 0,
      outsideLowVoltageProtection: f.powered && f.drainsBankIds.length > 0,
      drainsBankIds: f.drainsBankIds,
      powered: f.powered,
      bankShares: f.bankShares,
      forcesStandby: g.forcesStandby,
      how: g.how,
    };
  });
  const primary = projection.banks.find((b) => b.bankId === projection.primaryBankId)!;
  const dawnPlan = primary.tillDawn.reaches ? null : planForDawn(model, graph, state, { marginSocPct: req.options?.dawnMarginSocPct ?? 0 });
  return {
    schemaVersion: 2,
    projection: {
      startMs: projection.startMs,
      stepMin: projection.stepMin,
      horizonH: projection.horizonH,
      ...(curves ? { timesMs: projection.timesMs } : {}),
      nextSunriseMs: projection.nextSunriseMs,
      primaryBankId: projection.primaryBankId,
      banks: projection.banks.map(({ socPct, ...rest }) => (curves ? { ...rest, socPct } : rest)),
    },
    budget: projection.budget,
    audit,
    circuitGraph: { loads },
    solution: {
      positions: Object.values(sol.positions),
      bms: Object.values(sol.bms),
      nets: sol.nets.map((n) => ({ id: n.id, current: n.current, buses: n.nodes.filter((k) => k.startsWith("bus:")).map((k) => k.slice(4)), banks: n.banks, sourceIds: n.sourceIds, splitRule: n.splitRule, voltageV: n.voltageV })),
      standbyBmsW: sol.standbyBmsW,
    },
    operations: model.loads.map((l) => ({
      loadId: l.id,
      allOff: operationsFor(model, graph, l.id, "all-off", { plan }),
      now: operationsFor(model, graph, l.id, "now", { plan }),
    })),
    dawnPlan,
    present: model.banks.map((b) => ({ bankId: b.id, ...presentPower(model, graph, state, projection, projection.startMs, b.id) })),
    autonomy: model.banks.map((b) => autonomy(model, graph, projection.budget, b.id, state)),
  };
}

/** JSON Schema of the request body (draft 2020-12), for GET /api/v1/schema. */
export function projectionRequestJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(projectionRequestSchema, { io: "input", unrepresentable: "any" }) as Record<string, unknown>;
}
