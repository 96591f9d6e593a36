/**
 * The switch history between an SoC entry and now, as the engine's `CurrentState.history`
 * (./engine/carry-forward): what was on from each change on, so an SoC entered hours ago is
 * carried forward through the switches of the hours in between instead of the present ones.
 *
 * From `switch_changes` (applied rows only: a change that lost to a later write never held),
 * between the oldest SoC entry's `takenAt` (at most `MAX_WINDOW_MS` back) and `nowMs`, the
 * newest `MAX_ROWS` rows, grouped by server time into at most `MAX_ENTRIES - 1` changes plus the
 * state at the start. The loads on are rebuilt backwards from the present: before a load's
 * first change in the window it had the value of its last applied change before the window
 * (one lateral query for all), or — with none on record — the opposite of that first change. A change that
 * came from applying a mode carries the mode's id. Switch positions and mode choices without
 * load changes are not in `switch_changes`: the present ones hold for the whole gap.
 */
import { sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import type { RigModel } from "~/engine/model";
import type { CurrentState } from "~/engine/state";
import { effectiveLoadsOn, type RigState } from "~/schemas/rig-state";

export type SwitchHistory = NonNullable<CurrentState["history"]>;
type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** An SoC older than this is not carried forward through history (the alert rules' 48 h too). */
export const MAX_WINDOW_MS = 48 * 3_600_000;
export const MAX_ROWS = 2000;
/** The engine's schema takes at most 200 history entries. */
export const MAX_ENTRIES = 200;

/** The oldest SoC entry's time (primary and other banks), if within the window before now. */
export function historyStartMs(state: RigState, nowMs: number): number | null {
  const times = [state.soc, ...Object.values(state.bankSocs ?? {})].filter((s) => s !== null && s !== undefined).map((s) => Date.parse(s!.takenAt));
  const inWindow = times.filter((t) => Number.isFinite(t) && t < nowMs && nowMs - t <= MAX_WINDOW_MS);
  return inWindow.length ? Math.min(...inWindow) : null;
}

type Row = { loadId: string; on: boolean; modeId: string | null; serverTime: Date };

/** Pure: the history entries from the present loads on and the window's rows (oldest first). */
export function historyFromRows(presentOn: Iterable<string>, rows: Row[], prior: Map<string, boolean>, startMs: number): SwitchHistory {
  if (!rows.length) return [];
  const groups: Row[][] = [];
  for (const r of rows) {
    const last = groups[groups.length - 1];
    if (last && last[0]!.serverTime.getTime() === r.serverTime.getTime()) last.push(r);
    else groups.push([r]);
  }
  const kept = groups.slice(-(MAX_ENTRIES - 1));
  const on = new Set(presentOn);
  const firstSeen = new Set<string>();
  for (const g of kept)
    for (const r of g) {
      if (firstSeen.has(r.loadId)) continue;
      firstSeen.add(r.loadId);
      const before = prior.get(r.loadId) ?? !r.on;
      if (before) on.add(r.loadId);
      else on.delete(r.loadId);
    }
  const out: SwitchHistory = [{ at: new Date(startMs).toISOString(), loadsOn: [...on].sort() }];
  for (const g of kept) {
    let modeId: string | null = null;
    for (const r of g) {
      if (r.on) on.add(r.loadId);
      else on.delete(r.loadId);
      modeId = r.modeId ?? modeId;
    }
    out.push({ at: g[0]!.serverTime.toISOString(), loadsOn: [...on].sort(), ...(modeId ? { modeId } : {}) });
  }
  return out;
}

/**
 * The switch histories of many rigs at once (the schedule's sweep passes a page): two queries
 * whatever the number of rigs (one lateral per rig for its window's rows, one per changed load
 * for its value before the window). Rigs with no SoC entry in the window or no change are left out.
 */
export async function loadSwitchHistories(db: Db | Tx, items: Array<{ rigId: string; model: RigModel; state: RigState }>, nowMs: number): Promise<Map<string, SwitchHistory>> {
  const out = new Map<string, SwitchHistory>();
  const asked = items.map((i) => ({ ...i, startMs: historyStartMs(i.state, nowMs) })).filter((i): i is typeof i & { startMs: number } => i.startMs !== null);
  if (!asked.length) return out;
  const rowsRes = await db.execute<{ rig_id: string; id: string; load_id: string; on: boolean; mode_id: string | null; server_time: Date | string }>(sql`
    select r.rig_id, x.id, x.load_id, x.on, x.mode_id, x.server_time
    from unnest(${sql.param(asked.map((a) => a.rigId))}::uuid[], ${sql.param(asked.map((a) => new Date(a.startMs).toISOString()))}::timestamptz[]) as r(rig_id, start_at)
    cross join lateral (
      select id, load_id, "on", mode_id, server_time from switch_changes
      where rig_id = r.rig_id and applied and server_time > r.start_at and server_time <= ${new Date(nowMs).toISOString()}::timestamptz
      order by server_time desc, id desc limit ${MAX_ROWS}
    ) x`);
  const byRig = new Map<string, Array<Row & { id: number }>>();
  for (const r of rowsRes.rows) {
    const list = byRig.get(r.rig_id) ?? byRig.set(r.rig_id, []).get(r.rig_id)!;
    list.push({ id: Number(r.id), loadId: r.load_id, on: r.on, modeId: r.mode_id, serverTime: new Date(r.server_time) });
  }
  if (!byRig.size) return out;
  // Oldest first within each rig.
  for (const list of byRig.values()) list.sort((a, b) => a.serverTime.getTime() - b.serverTime.getTime() || a.id - b.id);
  const triples: Array<{ rigId: string; loadId: string; before: string }> = [];
  for (const [rigId, list] of byRig) {
    const before = list[0]!.serverTime.toISOString();
    for (const loadId of new Set(list.map((r) => r.loadId))) triples.push({ rigId, loadId, before });
  }
  const priorRes = await db.execute<{ rig_id: string; load_id: string; on: boolean }>(sql`
    select t.rig_id, t.load_id, x.on
    from unnest(${sql.param(triples.map((t) => t.rigId))}::uuid[], ${sql.param(triples.map((t) => t.loadId))}::text[], ${sql.param(triples.map((t) => t.before))}::timestamptz[]) as t(rig_id, load_id, before_at)
    cross join lateral (
      select "on" from switch_changes
      where rig_id = t.rig_id and load_id = t.load_id and applied and server_time < t.before_at
      order by server_time desc, id desc limit 1
    ) x`);
  const prior = new Map<string, Map<string, boolean>>();
  for (const r of priorRes.rows) (prior.get(r.rig_id) ?? prior.set(r.rig_id, new Map()).get(r.rig_id)!).set(r.load_id, r.on);
  for (const a of asked) {
    const rows = byRig.get(a.rigId);
    if (!rows) continue;
    const present = effectiveLoadsOn(a.model, a.state.modeId, a.state.switches);
    out.set(a.rigId, historyFromRows(present, rows, prior.get(a.rigId) ?? new Map(), a.startMs));
  }
  return out;
}

/** The switch history for a rig's state (empty when no SoC entry is old enough or nothing changed). */
export async function loadSwitchHistory(db: Db | Tx, rigId: string, model: RigModel, state: RigState, nowMs: number): Promise<SwitchHistory> {
  return (await loadSwitchHistories(db, [{ rigId, model, state }], nowMs)).get(rigId) ?? [];
}

/** The state with its switch history attached (for the Now screen, the API and the alerts);
 * `socFrom`: the state whose SoC entries set the window (the alerts' newest SoC). */
export async function withSwitchHistory(db: Db | Tx, rigId: string, model: RigModel, state: RigState, nowMs: number, socFrom: RigState = state): Promise<RigState> {
  const history = await loadSwitchHistory(db, rigId, model, socFrom, nowMs);
  return history.length ? { ...state, history } : state;
}
