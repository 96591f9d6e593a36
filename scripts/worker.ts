// The alert worker: takes jobs from the pg-boss queues (evaluate a rig, the minute sweep of
// time-based rules, deliver a push or an e-mail). Run one or more next to any number of app
// servers, all against the same DATABASE_URL (and the same VAPID keys). `npm start` starts one.
//   node --import tsx scripts/worker.ts
import { startAlertWorker, createBoss } from "../app/alerts/queue.server";
import { createDb } from "../app/db/db.server";
import { appOrigin, getEnv } from "../app/env.server";
import { sendMail } from "../app/mail/mailer.server";
import { sendPush } from "../app/push/send.server";
import { loadVapidKeys } from "../app/push/vapid.server";

const env = getEnv();
loadVapidKeys();
const { db, pool } = createDb(env.DATABASE_URL, 5);
const boss = createBoss(env.DATABASE_URL, "worker");
await boss.start();
await startAlertWorker(boss, { db, appUrl: appOrigin(), sendPush, sendMail });
console.log("[worker] alert worker running");

const stop = async () => {
  await boss.stop({ graceful: true, timeout: 5000 }).catch(() => undefined);
  await pool.end().catch(() => undefined);
  process.exit(0);
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
