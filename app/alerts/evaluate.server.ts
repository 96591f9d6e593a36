/**
 * Alert evaluation on the server: load what a rig's rules need, find which conditions hold
 * (`evaluateConditions`), open an episode when one starts and clear it when it ends, and write
 * the deliveries (who is told, how) in the same transaction.
 *
 * Exactly once across servers: an episode is opened by an INSERT that a partial unique index
 * (one open episode per rig and rule) lets through once, and cleared by an UPDATE of the open
 * row; only the transaction that did either writes deliveries, and each delivery is unique per
 * episode, phase, channel and target. Several servers evaluating the same rig at once alert once.
 */
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { alertDeliveries, alertEpisodes, alertPreferences, alertRules, modelBranches, modelRevisions, pushSubscriptions, rigMembers, rigs, rigState, users } from "~/db/schema";
import { validateModel, type RigModel } from "~/engine/model";
import { getRigState, rowToState } from "~/repos/rig-state.server";
import { loadSwitchHistories, withSwitchHistory } from "~/repos/switch-history.server";
import { emptyRigState } from "~/schemas/rig-state";
import { evaluateConditions, withNewestSoc, type Condition, type RecentReading } from "./conditions";
import { alertDawnPlanLine } from "./dawn-line";
import { mayNotify, rulesWithDefaults, TIME_BASED_RULES, type Preferences, type RigRules, type RuleKind } from "./rules";
import { alertText } from "./text";
import type { RigState } from "~/schemas/rig-state";

export type EvaluateOptions = {
  appUrl: string;
  /** Only these rules may open or clear episodes (the schedule passes the time-based ones). */
  only?: readonly RuleKind[];
  /**
   * One sentence of the engine's dawn plan for this rig, added to the runway and falls-short
   * warnings. Default: `alertDawnPlanLine` (./dawn-line); `null` leaves the plan out. Called
   * only when one of those two episodes opens (never for rigs whose rules do not fire).
   */
  dawnPlanLine?: ((rigId: string, model: RigModel, state: RigState, nowMs: number) => string | null) | null;
};

const PLAN_RULES: readonly RuleKind[] = ["runway_low", "falls_short"];

/** The dawn-plan sentence for a rig, computed at most once and only when asked for. */
function lazyPlan(opts: EvaluateOptions, rigId: string, model: RigModel, state: RigState, nowMs: number): () => string | null {
  let done = false;
  let line: string | null = null;
  return () => {
    if (!done) {
      done = true;
      const f = opts.dawnPlanLine === undefined ? (_id: string, m: RigModel, st: RigState, t: number) => alertDawnPlanLine(m, st, t) : opts.dawnPlanLine;
      line = f ? f(rigId, model, state, nowMs) : null;
    }
    return line;
  };
}

export type EvaluationResult = { opened: string[]; cleared: string[]; deliveryIds: string[] };

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

const modelCache = new Map<string, RigModel | null>();
/** Parsed as-built documents by revision id (a revision never changes). */
function parseModel(revisionId: number, document: unknown): RigModel | null {
  const key = String(revisionId);
  if (modelCache.has(key)) return modelCache.get(key)!;
  const checked = validateModel(document);
  const model = checked.ok ? checked.model : null;
  if (modelCache.size > 20_000) modelCache.clear();
  modelCache.set(key, model);
  return model;
}

async function loadAsBuilt(db: Db | Tx, rigIds: string[]) {
  if (!rigIds.length) return new Map<string, RigModel | null>();
  const rows = await db
    .select({ rigId: modelBranches.rigId, id: modelRevisions.id, document: modelRevisions.document })
    .from(modelBranches)
    .innerJoin(modelRevisions, and(eq(modelRevisions.branchId, modelBranches.id), eq(modelRevisions.revision, modelBranches.headRevision)))
    .where(and(inArray(modelBranches.rigId, rigIds), eq(modelBranches.kind, "as_built")));
  return new Map(rows.map((r) => [r.rigId, parseModel(r.id, r.document)]));
}

/** The newest few readings of each rig (one index-backed lateral query for many rigs). */
async function loadRecentReadings(db: Db | Tx, rigIds: string[], perRig = 4): Promise<Map<string, RecentReading[]>> {
  const out = new Map<string, RecentReading[]>(rigIds.map((id) => [id, []]));
  if (!rigIds.length) return out;
  const rows = await db.execute<{ rig_id: string; taken_at: Date | string; soc_pct: number | null; bank_voltage_v: number | null; current_a: number | null }>(sql`
    select r.id as rig_id, x.taken_at, x.soc_pct, x.bank_voltage_v, x.current_a
    from unnest(${sql.param(rigIds)}::uuid[]) as r(id)
    cross join lateral (
      select taken_at, soc_pct, bank_voltage_v, current_a from readings
      where rig_id = r.id and deleted_at is null
      order by taken_at desc limit ${perRig}
    ) x`);
  for (const row of rows.rows) {
    out.get(row.rig_id)!.push({
      takenAtMs: new Date(row.taken_at).getTime(),
      socPct: row.soc_pct,
      bankVoltageV: row.bank_voltage_v,
      currentA: row.current_a,
    });
  }
  for (const list of out.values()) list.sort((a, b) => b.takenAtMs - a.takenAtMs);
  return out;
}

/** Opens and clears episodes for one rig from its conditions; writes the deliveries. */
export async function applyConditions(
  db: Db | Tx,
  rig: { id: string; name: string; timeZone: string },
  conditions: Condition[],
  nowMs: number,
  opts: EvaluateOptions & { dawnPlan?: () => string | null; openRules?: Set<string>; inTransaction?: boolean },
): Promise<EvaluationResult> {
  const result: EvaluationResult = { opened: [], cleared: [], deliveryIds: [] };
  const scoped = conditions.filter((c) => !opts.only || opts.only.includes(c.rule));
  if (!scoped.length) return result;
  // The open episodes as read before (a sweep reads a page's at once); the writes below are
  // guarded by the database either way, so a stale view can only cost a no-op.
  const openRules =
    opts.openRules ??
    new Set(
      (await db.select({ rule: alertEpisodes.rule }).from(alertEpisodes).where(and(eq(alertEpisodes.rigId, rig.id), isNull(alertEpisodes.clearedAt)))).map((o) => o.rule),
    );
  const changes = scoped.filter((c) => c.active !== openRules.has(c.rule));
  if (!changes.length) return result;

  // The engine's dawn plan only when a runway or falls-short alert opens (CPU outside the transaction).
  const dawnPlan = opts.dawnPlan && changes.some((c) => c.active && PLAN_RULES.includes(c.rule)) ? opts.dawnPlan() : null;
  const write = async (tx: Tx | Db) => {
    for (const c of changes) {
      const text = alertText(
        { rule: c.rule, rigName: rig.name, rigId: rig.id, detail: c.detail, timeZone: rig.timeZone, appUrl: opts.appUrl, dawnPlanLine: PLAN_RULES.includes(c.rule) ? dawnPlan : null },
        nowMs,
      );
      if (c.active) {
        const inserted = await tx.execute<{ id: string }>(sql`
          insert into alert_episodes (rig_id, rule, started_at, title, body, clear_body, detail)
          values (${rig.id}::uuid, ${c.rule}, ${new Date(nowMs).toISOString()}::timestamptz, ${text.title}, ${text.body}, ${text.clearBody}, ${JSON.stringify(c.detail)}::jsonb)
          on conflict (rig_id, rule) where cleared_at is null do nothing
          returning id`);
        const id = inserted.rows[0]?.id;
        if (!id) continue;
        result.opened.push(id);
        result.deliveryIds.push(...(await addAlertDeliveries(tx, rig.id, id, c.rule, nowMs)));
      } else {
        const cleared = await tx
          .update(alertEpisodes)
          .set({ clearedAt: new Date(nowMs) })
          .where(and(eq(alertEpisodes.rigId, rig.id), eq(alertEpisodes.rule, c.rule), isNull(alertEpisodes.clearedAt)))
          .returning({ id: alertEpisodes.id });
        const id = cleared[0]?.id;
        if (!id) continue;
        result.cleared.push(id);
        // The all clear goes to whoever was told (or is still being told) of the alert.
        const rows = await tx.execute<{ id: string }>(sql`
          insert into alert_deliveries (episode_id, rig_id, phase, user_id, channel, target)
          select episode_id, rig_id, 'clear', user_id, channel, target from alert_deliveries
          where episode_id = ${id}::uuid and phase = 'alert' and status not in ('quiet', 'gone')
          on conflict do nothing
          returning id`);
        result.deliveryIds.push(...rows.rows.map((r) => r.id));
      }
    }
  };
  // A sweep passes its page's transaction (one commit for many rigs); alone, a transaction of its own.
  if (opts.inTransaction) await write(db);
  else await (db as Db).transaction(write);
  return result;
}

/** Everyone on the rig who asked to be warned of this rule, per channel and device. */
async function addAlertDeliveries(tx: Tx | Db, rigId: string, episodeId: string, rule: RuleKind, nowMs: number): Promise<string[]> {
  const people = await tx
    .select({ userId: alertPreferences.userId, prefs: alertPreferences, email: users.email })
    .from(alertPreferences)
    .innerJoin(rigMembers, and(eq(rigMembers.rigId, alertPreferences.rigId), eq(rigMembers.userId, alertPreferences.userId)))
    .innerJoin(users, eq(users.id, alertPreferences.userId))
    .where(eq(alertPreferences.rigId, rigId));
  if (!people.length) return [];
  const subs = await tx
    .select({ id: pushSubscriptions.id, userId: pushSubscriptions.userId })
    .from(pushSubscriptions)
    .where(inArray(pushSubscriptions.userId, people.map((p) => p.userId)));
  const rows: Array<typeof alertDeliveries.$inferInsert> = [];
  for (const p of people) {
    const prefs = p.prefs as unknown as Preferences;
    if (!prefs.rules.includes(rule)) continue;
    const status = mayNotify(prefs, rule, nowMs) ? "pending" : "quiet";
    if (prefs.push) for (const s of subs.filter((s) => s.userId === p.userId)) rows.push({ episodeId, rigId, phase: "alert", userId: p.userId, channel: "push", target: s.id, status });
    if (prefs.email) rows.push({ episodeId, rigId, phase: "alert", userId: p.userId, channel: "email", target: p.email, status });
  }
  if (!rows.length) return [];
  const inserted = await tx.insert(alertDeliveries).values(rows).onConflictDoNothing().returning({ id: alertDeliveries.id, status: alertDeliveries.status });
  return inserted.filter((r) => r.status === "pending").map((r) => r.id);
}

/** Evaluates one rig now (a reading or a state change arrived, or the schedule's turn). */
export async function evaluateRig(db: Db, rigId: string, nowMs: number, opts: EvaluateOptions): Promise<EvaluationResult> {
  const [rig] = await db.select({ id: rigs.id, name: rigs.name }).from(rigs).where(eq(rigs.id, rigId));
  const empty: EvaluationResult = { opened: [], cleared: [], deliveryIds: [] };
  if (!rig) return empty;
  const model = (await loadAsBuilt(db, [rigId])).get(rigId);
  if (!model) return empty;
  const [sharedState, recent, rulesRow] = await Promise.all([
    getRigState(db, rigId),
    loadRecentReadings(db, [rigId]),
    db.select({ rules: alertRules.rules }).from(alertRules).where(eq(alertRules.rigId, rigId)),
  ]);
  const rules = rulesWithDefaults(rulesRow[0]?.rules);
  const readings = recent.get(rigId) ?? [];
  // The switches since the newest SoC, so the runway is carried through them.
  const state = await withSwitchHistory(db, rigId, model, sharedState, nowMs, withNewestSoc(sharedState, readings).state);
  const { conditions } = evaluateConditions({ model, state, readings, rules, nowMs });
  const dawnPlan = lazyPlan(opts, rigId, model, withNewestSoc(state, readings).state, nowMs);
  return applyConditions(db, { ...rig, timeZone: model.timeZone }, conditions, nowMs, { ...opts, dawnPlan });
}

/**
 * The schedule's pass: the time-based rules of every rig that someone asked to be warned
 * about, in pages of `pageSize` rigs (models, states, rules and the newest readings read in
 * one query each per page). Returns counts and the deliveries to send.
 */
export async function evaluateTimeBased(db: Db, nowMs: number, opts: EvaluateOptions & { pageSize?: number }) {
  const pageSize = opts.pageSize ?? 500;
  let after = "00000000-0000-0000-0000-000000000000";
  const total = { rigs: 0, opened: 0, cleared: 0, deliveryIds: [] as string[] };
  for (;;) {
    const page = await db
      .selectDistinct({ id: rigs.id, name: rigs.name })
      .from(rigs)
      .innerJoin(alertPreferences, eq(alertPreferences.rigId, rigs.id))
      .where(sql`${rigs.id} > ${after}::uuid`)
      .orderBy(rigs.id)
      .limit(pageSize);
    if (!page.length) break;
    after = page[page.length - 1]!.id;
    const ids = page.map((r) => r.id);
    const [models, recent, rulesRows, stateRows, openRows] = await Promise.all([
      loadAsBuilt(db, ids),
      loadRecentReadings(db, ids),
      db.select().from(alertRules).where(inArray(alertRules.rigId, ids)),
      db.select().from(rigState).where(inArray(rigState.rigId, ids)),
      db.select({ rigId: alertEpisodes.rigId, rule: alertEpisodes.rule }).from(alertEpisodes).where(and(inArray(alertEpisodes.rigId, ids), isNull(alertEpisodes.clearedAt))),
    ]);
    const rulesBy = new Map(rulesRows.map((r) => [r.rigId, rulesWithDefaults(r.rules)]));
    const stateBy = new Map(stateRows.map((r) => [r.rigId, rowToState(r, new Map())]));
    const openBy = new Map<string, Set<string>>();
    for (const o of openRows) (openBy.get(o.rigId) ?? openBy.set(o.rigId, new Set()).get(o.rigId)!).add(o.rule);
    // The switches since each rig's newest SoC (one query for the page), so its runway is carried through them.
    const histories = await loadSwitchHistories(
      db,
      page.flatMap((rig) => {
        const model = models.get(rig.id);
        return model ? [{ rigId: rig.id, model, state: withNewestSoc(stateBy.get(rig.id) ?? emptyRigState(rig.id), recent.get(rig.id) ?? []).state }] : [];
      }),
      nowMs,
    );
    const only = opts.only ?? TIME_BASED_RULES;
    // The engine's work first (CPU), then the rigs whose episodes change, in one transaction per page.
    const changed: Array<(tx: Tx) => Promise<EvaluationResult>> = [];
    for (const rig of page) {
      const model = models.get(rig.id);
      if (!model) continue;
      total.rigs++;
      const rules: RigRules = rulesBy.get(rig.id) ?? rulesWithDefaults(null);
      const shared = stateBy.get(rig.id) ?? emptyRigState(rig.id);
      const history = histories.get(rig.id);
      const state = history?.length ? { ...shared, history } : shared;
      const openRules = openBy.get(rig.id) ?? new Set<string>();
      const readings = recent.get(rig.id) ?? [];
      const { conditions } = evaluateConditions({ model, state, readings, rules, nowMs });
      if (!conditions.some((c) => only.includes(c.rule) && c.active !== openRules.has(c.rule))) continue;
      const dawnPlan = lazyPlan(opts, rig.id, model, withNewestSoc(state, readings).state, nowMs);
      changed.push((tx) => applyConditions(tx, { ...rig, timeZone: model.timeZone }, conditions, nowMs, { ...opts, only, openRules, inTransaction: true, dawnPlan }));
    }
    if (changed.length) {
      await db.transaction(async (tx) => {
        for (const f of changed) {
          const r = await f(tx);
          total.opened += r.opened.length;
          total.cleared += r.cleared.length;
          total.deliveryIds.push(...r.deliveryIds);
        }
      });
    }
    if (page.length < pageSize) break;
  }
  return total;
}

/** Deliveries still pending after a while (a process stopped between writing and queueing them). */
export async function strandedDeliveries(db: Db, olderThanMs = 60_000) {
  const rows = await db
    .select({ id: alertDeliveries.id })
    .from(alertDeliveries)
    .where(and(eq(alertDeliveries.status, "pending"), sql`${alertDeliveries.createdAt} < now() - make_interval(secs => ${olderThanMs / 1000})`))
    .orderBy(desc(alertDeliveries.createdAt))
    .limit(1000);
  return rows.map((r) => r.id);
}

