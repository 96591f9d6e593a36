/**
 * Alerts storage: a rig's rules, a person's "Warn me" preferences, push subscriptions (per
 * person and browser), and the alert log (episodes and deliveries).
 */
import { randomBytes } from "node:crypto";
import { and, desc, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { alertDeliveries, alertEpisodes, alertPreferences, alertRules, pushSubscriptions, users } from "~/db/schema";
import { DEFAULT_PREFERENCES, rulesWithDefaults, type Preferences, type RigRules } from "~/alerts/rules";

export async function getRigRules(db: Db, rigId: string): Promise<RigRules> {
  const [row] = await db.select({ rules: alertRules.rules }).from(alertRules).where(eq(alertRules.rigId, rigId));
  return rulesWithDefaults(row?.rules);
}

export async function saveRigRules(db: Db, rigId: string, rules: RigRules, userId: string) {
  await db
    .insert(alertRules)
    .values({ rigId, rules, updatedBy: userId })
    .onConflictDoUpdate({ target: alertRules.rigId, set: { rules, updatedBy: userId, updatedAt: new Date() } });
  // A rule turned off ends its open episode quietly (no all clear: nothing was resolved).
  const off = Object.entries(rules).filter(([, r]) => !r.enabled).map(([k]) => k);
  if (off.length) {
    await db
      .update(alertEpisodes)
      .set({ clearedAt: new Date() })
      .where(and(eq(alertEpisodes.rigId, rigId), inArray(alertEpisodes.rule, off), sql`${alertEpisodes.clearedAt} is null`));
  }
}

export type StoredPreferences = Preferences & { unsubscribeToken: string };

/** A person's preferences for a rig, or null when they have not asked to be warned. */
export async function getPreferences(db: Db, rigId: string, userId: string): Promise<StoredPreferences | null> {
  const [row] = await db.select().from(alertPreferences).where(and(eq(alertPreferences.rigId, rigId), eq(alertPreferences.userId, userId)));
  return row ? rowToPrefs(row) : null;
}

function rowToPrefs(row: typeof alertPreferences.$inferSelect): StoredPreferences {
  return {
    rules: row.rules as Preferences["rules"],
    quietStartMin: row.quietStartMin,
    quietEndMin: row.quietEndMin,
    timeZone: row.timeZone,
    push: row.push,
    email: row.email,
    unsubscribeToken: row.unsubscribeToken,
  };
}

export async function savePreferences(db: Db, rigId: string, userId: string, prefs: Preferences) {
  const values = { ...prefs, updatedAt: new Date() };
  await db
    .insert(alertPreferences)
    .values({ rigId, userId, ...values, unsubscribeToken: randomBytes(24).toString("base64url") })
    .onConflictDoUpdate({ target: [alertPreferences.rigId, alertPreferences.userId], set: values });
}

/** "Warn me" with the defaults, keeping what the person chose before. */
export async function ensurePreferences(db: Db, rigId: string, userId: string, timeZone: string): Promise<StoredPreferences> {
  const found = await getPreferences(db, rigId, userId);
  if (found) return found;
  await db
    .insert(alertPreferences)
    .values({ rigId, userId, ...DEFAULT_PREFERENCES, timeZone, unsubscribeToken: randomBytes(24).toString("base64url") })
    .onConflictDoNothing();
  return (await getPreferences(db, rigId, userId))!;
}

export async function stopAlerts(db: Db, rigId: string, userId: string) {
  await db.delete(alertPreferences).where(and(eq(alertPreferences.rigId, rigId), eq(alertPreferences.userId, userId)));
}

/** One-click unsubscribe from e-mail: turns e-mail off for that person and rig. */
export async function unsubscribeEmailByToken(db: Db, token: string) {
  const rows = await db
    .update(alertPreferences)
    .set({ email: false, updatedAt: new Date() })
    .where(eq(alertPreferences.unsubscribeToken, token))
    .returning({ rigId: alertPreferences.rigId, userId: alertPreferences.userId });
  return rows[0] ?? null;
}

export async function findByUnsubscribeToken(db: Db, token: string) {
  const [row] = await db
    .select({ rigId: alertPreferences.rigId, email: alertPreferences.email })
    .from(alertPreferences)
    .where(eq(alertPreferences.unsubscribeToken, token));
  return row ?? null;
}

/* ---------------------------------------------------------------- subscriptions */

export type NewSubscription = { endpoint: string; p256dh: string; auth: string; label: string };

/** Saves this browser's subscription for this person (an endpoint moves to whoever subscribed last). */
export async function saveSubscription(db: Db, userId: string, sub: NewSubscription) {
  const [row] = await db
    .insert(pushSubscriptions)
    .values({ userId, ...sub })
    .onConflictDoUpdate({ target: pushSubscriptions.endpoint, set: { userId, p256dh: sub.p256dh, auth: sub.auth, label: sub.label } })
    .returning({ id: pushSubscriptions.id });
  return row!.id;
}

export async function removeSubscription(db: Db, userId: string, endpoint: string) {
  const rows = await db
    .delete(pushSubscriptions)
    .where(and(eq(pushSubscriptions.userId, userId), eq(pushSubscriptions.endpoint, endpoint)))
    .returning({ id: pushSubscriptions.id });
  return rows.length > 0;
}

export async function listSubscriptions(db: Db, userId: string) {
  return db
    .select({ id: pushSubscriptions.id, endpoint: pushSubscriptions.endpoint, label: pushSubscriptions.label, createdAt: pushSubscriptions.createdAt, lastSentAt: pushSubscriptions.lastSentAt })
    .from(pushSubscriptions)
    .where(eq(pushSubscriptions.userId, userId))
    .orderBy(desc(pushSubscriptions.createdAt));
}

/* ---------------------------------------------------------------- the alert log */

export type AlertLogEntry = {
  id: string;
  rule: string;
  title: string;
  body: string;
  startedAt: string;
  clearedAt: string | null;
  deliveries: Array<{ phase: string; who: string; channel: string; status: string; error: string | null; at: string }>;
};

export async function listAlertLog(db: Db, rigId: string, limit = 50): Promise<AlertLogEntry[]> {
  const episodes = await db.select().from(alertEpisodes).where(eq(alertEpisodes.rigId, rigId)).orderBy(desc(alertEpisodes.startedAt)).limit(limit);
  if (!episodes.length) return [];
  const deliveries = await db
    .select({
      episodeId: alertDeliveries.episodeId,
      phase: alertDeliveries.phase,
      channel: alertDeliveries.channel,
      status: alertDeliveries.status,
      error: alertDeliveries.error,
      createdAt: alertDeliveries.createdAt,
      sentAt: alertDeliveries.sentAt,
      name: users.name,
      email: users.email,
    })
    .from(alertDeliveries)
    .leftJoin(users, eq(users.id, alertDeliveries.userId))
    .where(inArray(alertDeliveries.episodeId, episodes.map((e) => e.id)))
    .orderBy(alertDeliveries.createdAt);
  return episodes.map((e) => ({
    id: e.id,
    rule: e.rule,
    title: e.title,
    body: e.body,
    startedAt: e.startedAt.toISOString(),
    clearedAt: e.clearedAt ? e.clearedAt.toISOString() : null,
    deliveries: deliveries
      .filter((d) => d.episodeId === e.id)
      .map((d) => ({
        phase: d.phase,
        who: d.name || d.email?.split("@")[0] || "someone who left",
        channel: d.channel,
        status: d.status,
        error: d.error,
        at: (d.sentAt ?? d.createdAt).toISOString(),
      })),
  }));
}

export async function countOpenEpisodes(db: Db, rigId: string) {
  const [row] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(alertEpisodes)
    .where(and(eq(alertEpisodes.rigId, rigId), sql`${alertEpisodes.clearedAt} is null`));
  return row?.n ?? 0;
}
