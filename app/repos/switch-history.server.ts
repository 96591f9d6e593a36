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
 * (one query), or — with none on record — the opposite of that first change. A change that
 * came from applying a mode carries the mode's id. Switch positions and mode choices without
 * load changes are not in `switch_changes`: the present ones hold for the whole gap.
 */
import { and, asc, desc, eq, gt, inArray, lt, lte } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { switchChanges } from "~/db/schema";
import type { RigModel } from "~/engine/model";
import type { CurrentState } from "~/engine/state";
import { effectiveLoadsOn, type RigState } from "~/schemas/rig-state";

export type SwitchHistory = NonNullable<CurrentState["history"]>;

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

/** The switch history for a rig's state (empty when no SoC entry is old enough or nothing changed). */
export async function loadSwitchHistory(db: Db, rigId: string, model: RigModel, state: RigState, nowMs: number): Promise<SwitchHistory> {
  const startMs = historyStartMs(state, nowMs);
  if (startMs === null) return [];
  const newest = await db
    .select({ id: switchChanges.id, loadId: switchChanges.loadId, on: switchChanges.on, modeId: switchChanges.modeId, serverTime: switchChanges.serverTime })
    .from(switchChanges)
    .where(and(eq(switchChanges.rigId, rigId), eq(switchChanges.applied, true), gt(switchChanges.serverTime, new Date(startMs)), lte(switchChanges.serverTime, new Date(nowMs))))
    .orderBy(desc(switchChanges.serverTime), desc(switchChanges.id))
    .limit(MAX_ROWS);
  if (!newest.length) return [];
  const rows = newest.reverse();
  const firstAt = rows[0]!.serverTime;
  const loadIds = [...new Set(rows.map((r) => r.loadId))];
  const priorRows = await db
    .selectDistinctOn([switchChanges.loadId], { loadId: switchChanges.loadId, on: switchChanges.on })
    .from(switchChanges)
    .where(and(eq(switchChanges.rigId, rigId), eq(switchChanges.applied, true), inArray(switchChanges.loadId, loadIds), lt(switchChanges.serverTime, firstAt)))
    .orderBy(asc(switchChanges.loadId), desc(switchChanges.serverTime), desc(switchChanges.id));
  const present = effectiveLoadsOn(model, state.modeId, state.switches);
  return historyFromRows(present, rows, new Map(priorRows.map((r) => [r.loadId, r.on])), startMs);
}

/** The state with its switch history attached (for the Now screen, the API and the alerts);
 * `socFrom`: the state whose SoC entries set the window (the alerts' newest SoC). */
export async function withSwitchHistory(db: Db, rigId: string, model: RigModel, state: RigState, nowMs: number, socFrom: RigState = state): Promise<RigState> {
  const history = await loadSwitchHistory(db, rigId, model, socFrom, nowMs);
  return history.length ? { ...state, history } : state;
}
