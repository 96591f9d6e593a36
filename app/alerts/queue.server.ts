/**
 * The alert job queue: pg-boss 10 on the app's PostgreSQL (schema `pgboss`). App servers only
 * put jobs in; one or more workers (`scripts/worker.ts`) take them out. Any number of either
 * may run against one database: a job is handed to one worker at a time, the minute schedule
 * fires once per minute across all workers, and the alert tables' unique indexes make each
 * alert and each delivery happen once even if a job runs twice.
 *
 * Queues: `alerts-evaluate` (one rig, after a reading or a state change), `alerts-sweep`
 * (every minute: the time-based rules of every watched rig, and stranded deliveries),
 * `alerts-deliver` (one push or e-mail; 6 tries with exponential backoff from 10 s).
 */
import PgBoss from "pg-boss";
import type { Db } from "~/db/db.server";
import type { DeliverDeps } from "./deliver.server";
import { deliverOne } from "./deliver.server";
import { evaluateRig, evaluateTimeBased, strandedDeliveries, type EvaluateOptions } from "./evaluate.server";

export const QUEUE = { evaluate: "alerts-evaluate", sweep: "alerts-sweep", deliver: "alerts-deliver" } as const;
const DELIVER_RETRIES = 5;

export function createBoss(connectionString: string, role: "app" | "worker", options: { schema?: string } = {}): PgBoss {
  const boss = new PgBoss({
    connectionString,
    schema: options.schema ?? "pgboss",
    max: role === "app" ? 2 : 4,
    application_name: `tilldawn-${role}`,
    ...(role === "app" ? { supervise: false, schedule: false } : {}),
  });
  boss.on("error", (error) => console.error(`[alerts] queue error: ${(error as Error).message}`));
  return boss;
}

export async function ensureQueues(boss: PgBoss) {
  await boss.createQueue(QUEUE.evaluate, { name: QUEUE.evaluate, policy: "stately", retryLimit: 2, retryDelay: 5, expireInMinutes: 5 });
  await boss.createQueue(QUEUE.sweep, { name: QUEUE.sweep, policy: "singleton", retryLimit: 0, expireInMinutes: 10 });
  await boss.createQueue(QUEUE.deliver, { name: QUEUE.deliver, retryLimit: DELIVER_RETRIES, retryDelay: 10, retryBackoff: true, expireInMinutes: 2 });
}

export async function queueDeliveries(boss: PgBoss, ids: string[]) {
  if (!ids.length) return;
  await boss.insert(ids.map((id) => ({ name: QUEUE.deliver, data: { deliveryId: id }, singletonKey: id, retryLimit: DELIVER_RETRIES, retryDelay: 10, retryBackoff: true })));
}

/* ------------------------------------------------------------- app servers */

const g = globalThis as unknown as { __tilldawnBoss?: Promise<PgBoss> };

/** This process's sending-only queue handle (started on first use). */
export function getAppBoss(connectionString: string): Promise<PgBoss> {
  if (!g.__tilldawnBoss) {
    g.__tilldawnBoss = (async () => {
      const boss = createBoss(connectionString, "app");
      await boss.start();
      await ensureQueues(boss);
      return boss;
    })();
    g.__tilldawnBoss.catch(() => (g.__tilldawnBoss = undefined));
  }
  return g.__tilldawnBoss;
}

/** Asks a worker to evaluate a rig's alerts soon; never fails the request that triggered it. */
export async function requestEvaluation(connectionString: string, rigId: string): Promise<void> {
  try {
    const boss = await getAppBoss(connectionString);
    await boss.send(QUEUE.evaluate, { rigId }, { singletonKey: rigId });
  } catch (error) {
    console.error(`[alerts] could not queue an evaluation of rig ${rigId}: ${(error as Error).message}`);
  }
}

/* ------------------------------------------------------------- workers */

export type WorkerOptions = EvaluateOptions & DeliverDeps & { db: Db; now?: () => number; sweepCron?: string | null };

/** Starts the three handlers on a started boss. */
export async function startAlertWorker(boss: PgBoss, opts: WorkerOptions) {
  const now = opts.now ?? Date.now;
  await ensureQueues(boss);
  if (opts.sweepCron !== null) await boss.schedule(QUEUE.sweep, opts.sweepCron ?? "* * * * *");
  await boss.work<{ rigId: string }>(QUEUE.evaluate, { pollingIntervalSeconds: 0.5 }, async ([job]) => {
    if (!job) return;
    const r = await evaluateRig(opts.db, job.data.rigId, now(), opts);
    await queueDeliveries(boss, r.deliveryIds);
  });
  await boss.work(QUEUE.sweep, { pollingIntervalSeconds: 2 }, async () => {
    const r = await evaluateTimeBased(opts.db, now(), opts);
    await queueDeliveries(boss, [...r.deliveryIds, ...(await strandedDeliveries(opts.db))]);
  });
  await boss.work<{ deliveryId: string }>(QUEUE.deliver, { pollingIntervalSeconds: 0.5, includeMetadata: true }, async ([job]) => {
    if (!job) return;
    await deliverOne(opts.db, job.data.deliveryId, opts, { isRetry: job.retryCount > 0, isLast: job.retryCount >= job.retryLimit });
  });
}
