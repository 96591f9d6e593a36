/**
 * Sends one delivery of the alert log: a push to one browser or an e-mail to one person.
 * A delivery is claimed by moving it out of `pending`/`retrying` (one sender at a time, so a
 * delivery queued twice is still sent once). Outcomes: `sent`; `gone` (the push service said
 * 404/410: the subscription is removed, no retry); `retrying` (thrown, so the queue retries
 * with backoff); `failed` after the last try.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "~/db/db.server";
import { alertDeliveries, alertEpisodes, alertPreferences, pushSubscriptions, rigs } from "~/db/schema";
import type { Mail } from "~/mail/mailer.server";
import type { PushSender } from "~/push/send.server";
import { alertEmail } from "./email";

export type DeliverDeps = { sendPush: PushSender; sendMail: (mail: Mail) => Promise<void>; appUrl: string };

export class RetryLater extends Error {
  override name = "RetryLater";
}

export async function deliverOne(db: Db, deliveryId: string, deps: DeliverDeps, attempt: { isLast: boolean; isRetry: boolean }): Promise<string> {
  const claimable = attempt.isRetry ? ["pending", "retrying", "sending"] : ["pending", "retrying"];
  const [d] = await db
    .update(alertDeliveries)
    .set({ status: "sending", attempts: sql`${alertDeliveries.attempts} + 1` })
    .where(and(eq(alertDeliveries.id, deliveryId), inArray(alertDeliveries.status, claimable)))
    .returning();
  if (!d) return "skipped";
  const [episode] = await db
    .select({ id: alertEpisodes.id, rule: alertEpisodes.rule, title: alertEpisodes.title, body: alertEpisodes.body, clearBody: alertEpisodes.clearBody, rigName: rigs.name })
    .from(alertEpisodes)
    .innerJoin(rigs, eq(rigs.id, alertEpisodes.rigId))
    .where(eq(alertEpisodes.id, d.episodeId));
  if (!episode) return finish(db, d.id, "failed", "the alert is gone");
  const clear = d.phase === "clear";
  const title = clear ? `${episode.rigName}: all clear` : episode.title;
  const body = clear ? (episode.clearBody ?? `All clear on ${episode.rigName}.`) : episode.body;
  const url = `${deps.appUrl.replace(/\/$/, "")}/rigs/${d.rigId}`;

  const [prefs] = await db
    .select({ token: alertPreferences.unsubscribeToken, email: alertPreferences.email, push: alertPreferences.push })
    .from(alertPreferences)
    .where(and(eq(alertPreferences.rigId, d.rigId), eq(alertPreferences.userId, d.userId ?? "00000000-0000-0000-0000-000000000000")));

  if (d.channel === "push") {
    // The person may have stopped alerts (or push) since the delivery was written.
    if (!prefs?.push) return finish(db, d.id, "gone", "push alerts were turned off");
    const [sub] = await db.select().from(pushSubscriptions).where(eq(pushSubscriptions.id, d.target));
    if (!sub) return finish(db, d.id, "gone", "this browser stopped receiving alerts");
    const outcome = await deps.sendPush(sub, { title, body, url, tag: `${episode.id}:${d.phase}` });
    if (outcome.ok) {
      await db.update(pushSubscriptions).set({ lastSentAt: new Date() }).where(eq(pushSubscriptions.id, sub.id));
      return finish(db, d.id, "sent", null);
    }
    if (outcome.gone) {
      await db.delete(pushSubscriptions).where(eq(pushSubscriptions.id, sub.id));
      return finish(db, d.id, "gone", `the push service answered ${outcome.status}: subscription removed`);
    }
    return retryOrFail(db, d.id, attempt.isLast, `push failed: ${outcome.status ?? "no answer"} ${outcome.message}`);
  }

  if (!prefs?.email) return finish(db, d.id, "gone", "e-mail alerts were turned off");
  try {
    await deps.sendMail(alertEmail({ to: d.target, title, body, url, unsubscribeUrl: `${deps.appUrl.replace(/\/$/, "")}/alerts/unsubscribe/${prefs.token}` }));
    return finish(db, d.id, "sent", null);
  } catch (error) {
    return retryOrFail(db, d.id, attempt.isLast, `e-mail failed: ${(error as Error).message}`);
  }
}

async function finish(db: Db, id: string, status: string, error: string | null) {
  await db
    .update(alertDeliveries)
    .set({ status, error, ...(status === "sent" ? { sentAt: new Date() } : {}) })
    .where(eq(alertDeliveries.id, id));
  return status;
}

async function retryOrFail(db: Db, id: string, isLast: boolean, error: string): Promise<string> {
  await finish(db, id, isLast ? "failed" : "retrying", error);
  if (isLast) return "failed";
  throw new RetryLater(error);
}
