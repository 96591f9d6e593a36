// Several app servers and workers against one PostgreSQL: each alert is sent once.
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, expect, test } from "vitest";
import { createBoss, ensureQueues, queueDeliveries, QUEUE, startAlertWorker } from "~/alerts/queue.server";
import { evaluateRig } from "~/alerts/evaluate.server";
import { alertDeliveries, alertEpisodes } from "~/db/schema";
import { sendPush } from "~/push/send.server";
import { createDeviceToken, storeDeviceReadings } from "~/repos/devices.server";
import * as pushRoute from "~/routes/api.rigs.$rigId.push";
import { startPushFake } from "../../scripts/fakes";
import { callRoute } from "./auth";
import { openTestDb, testDatabaseUrl } from "./db";
import { browserKeys, decrypt, makeJuniper, NIGHT_MS, received } from "./alerts-helpers";

const appA = openTestDb();
const appB = openTestDb();
const workerDb1 = openTestDb();
const workerDb2 = openTestDb();
// A queue schema of this test's own, so jobs of other test files never reach these workers.
const schema = `pgboss_scale_${crypto.randomUUID().slice(0, 8)}`;
const bosses = [createBoss(testDatabaseUrl, "app", { schema }), createBoss(testDatabaseUrl, "app", { schema }), createBoss(testDatabaseUrl, "worker", { schema }), createBoss(testDatabaseUrl, "worker", { schema })];
let fake: Awaited<ReturnType<typeof startPushFake>>;
let dir: string;

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "tilldawn-scale-"));
  process.env.VAPID_KEYS_FILE = path.join(dir, "vapid.json");
  fake = await startPushFake({ port: 0, dir });
  for (const b of bosses) await b.start();
  await ensureQueues(bosses[0]!);
}, 60_000);

afterAll(async () => {
  for (const b of bosses) await b.stop({ graceful: false, wait: true }).catch(() => undefined);
  await appA.db.execute(`drop schema if exists ${schema} cascade` as never).catch(() => undefined);
  for (const x of [appA, appB, workerDb1, workerDb2]) await x.pool.end();
  await fake.close();
  await rm(dir, { recursive: true, force: true });
}, 60_000);

test("two app servers and two workers on one database send each alert once to each browser", async () => {
  const j = await makeJuniper(appA.db);
  const subs: Array<{ id: string; keys: ReturnType<typeof browserKeys> }> = [];
  for (const cookie of [j.guestCookie, j.ownerCookie]) {
    const keys = browserKeys();
    const id = `scale-${crypto.randomUUID()}`;
    const res = await callRoute(pushRoute.action, {
      path: `/api/rigs/${j.rig.id}/push`,
      cookie,
      params: { rigId: j.rig.id },
      json: { intent: "subscribe", subscription: { endpoint: `${fake.url}/push/${id}`, keys: { p256dh: keys.p256dh, auth: keys.auth } } },
    });
    expect(res.status).toBe(200);
    subs.push({ id, keys });
  }
  const device = await createDeviceToken(appA.db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
  await storeDeviceReadings(appA.db, { id: device.id, rigId: j.rig.id, name: device.name }, [{ takenAt: new Date(NIGHT_MS - 60_000).toISOString(), socPct: 20 }]);

  const opts = { appUrl: "http://tilldawn.test", sendPush, sendMail: async () => undefined, now: () => NIGHT_MS, sweepCron: null };
  await startAlertWorker(bosses[2]!, { ...opts, db: workerDb1.db });
  await startAlertWorker(bosses[3]!, { ...opts, db: workerDb2.db });

  // Both servers hear of the reading at once: each evaluates in its own request and also asks
  // the workers to evaluate (as the ingest route does), several times over.
  const [a, b] = await Promise.all([
    evaluateRig(appA.db, j.rig.id, NIGHT_MS, opts),
    evaluateRig(appB.db, j.rig.id, NIGHT_MS, opts),
    ...[0, 1, 2].map((i) => bosses[i % 2]!.send(QUEUE.evaluate, { rigId: j.rig.id })),
  ]);
  await queueDeliveries(bosses[0]!, a!.deliveryIds);
  await queueDeliveries(bosses[1]!, b!.deliveryIds);
  // Even a delivery queued twice is sent once.
  await queueDeliveries(bosses[1]!, a!.deliveryIds);

  const episodes = await appA.db.select().from(alertEpisodes).where(eq(alertEpisodes.rigId, j.rig.id));
  expect(episodes.length).toBeGreaterThan(0);
  expect(new Set(episodes.map((e) => e.rule)).size).toBe(episodes.length);
  const want = episodes.length;
  const deadline = Date.now() + 30_000;
  for (;;) {
    const counts = await Promise.all(subs.map((s) => received(fake.url, s.id).then((r) => r.length)));
    if (counts.every((c) => c >= want) || Date.now() > deadline) break;
    await new Promise((r) => setTimeout(r, 200));
  }
  // Give a duplicate time to show up if there were one.
  await new Promise((r) => setTimeout(r, 2500));
  for (const s of subs) {
    const got = await received(fake.url, s.id);
    const titles = got.map((g) => (decrypt(g, s.keys) as { title: string }).title).sort();
    expect(titles).toEqual(episodes.map((e) => e.title).sort());
  }
  const deliveries = await appA.db.select().from(alertDeliveries).where(eq(alertDeliveries.rigId, j.rig.id));
  expect(deliveries.length).toBe(want * subs.length);
  expect(deliveries.every((d) => d.status === "sent" && d.attempts === 1)).toBe(true);
}, 60_000);
