import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { deliverOne, RetryLater, type DeliverDeps } from "~/alerts/deliver.server";
import { withNewestSoc } from "~/alerts/conditions";
import { alertDawnPlanLine } from "~/alerts/dawn-line";
import { evaluateRig, evaluateTimeBased } from "~/alerts/evaluate.server";
import { getAsBuiltModel } from "~/repos/models.server";
import { getRigState } from "~/repos/rig-state.server";
import { alertDeliveries, alertEpisodes, pushSubscriptions } from "~/db/schema";
import type { Mail } from "~/mail/mailer.server";
import { sendPush } from "~/push/send.server";
import { getRigRules, listAlertLog, savePreferences, saveRigRules, stopAlerts } from "~/repos/alerts.server";
import { createDeviceToken } from "~/repos/devices.server";
import * as pushRoute from "~/routes/api.rigs.$rigId.push";
import * as ingestRoute from "~/routes/api.v1.rigs.$rigId.readings";
import * as unsubscribeRoute from "~/routes/alerts.unsubscribe.$token";
import * as alertsPage from "~/routes/rig.alerts";
import { startPushFake } from "../../scripts/fakes";
import { callRoute } from "./auth";
import { openTestDb } from "./db";
import { browserKeys, decrypt, makeJuniper, NIGHT_MS, received } from "./alerts-helpers";

const { db, pool } = openTestDb();
let fake: Awaited<ReturnType<typeof startPushFake>>;
let dir: string;
const mails: Mail[] = [];
const deps: DeliverDeps = { sendPush, sendMail: async (m) => void mails.push(m), appUrl: "http://tilldawn.test" };
const opts = { appUrl: "http://tilldawn.test" };

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "tilldawn-push-"));
  process.env.VAPID_KEYS_FILE = path.join(dir, "vapid.json");
  fake = await startPushFake({ port: 0, dir });
});
afterAll(async () => {
  await fake.close();
  await pool.end();
  await rm(dir, { recursive: true, force: true });
});

async function subscribe(rigId: string, cookie: string, id: string, keys = browserKeys()) {
  const res = await callRoute(pushRoute.action, {
    path: `/api/rigs/${rigId}/push`,
    cookie,
    params: { rigId },
    json: { intent: "subscribe", subscription: { endpoint: `${fake.url}/push/${id}`, keys: { p256dh: keys.p256dh, auth: keys.auth } }, timeZone: "America/Denver" },
  });
  expect(res.status).toBe(200);
  return { keys, subscriptionId: (res.body as { subscriptionId: string }).subscriptionId };
}

async function post(rigId: string, token: string, body: unknown) {
  return callRoute(ingestRoute.action, { path: `/api/v1/rigs/${rigId}/readings`, json: body, origin: null, headers: { authorization: `Bearer ${token}` }, params: { rigId } });
}

async function deliverAll(ids: string[]) {
  for (const id of ids) await deliverOne(db, id, deps, { isRetry: false, isLast: false });
}

const at = (ms: number) => new Date(ms).toISOString();

describe("push alerts", () => {
  test("the push is really encrypted for the subscriber: the test's own P-256 keys decrypt it to the alert text", async () => {
    const j = await makeJuniper(db);
    const sub = await subscribe(j.rig.id, j.guestCookie, `t-${crypto.randomUUID()}`);
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    expect((await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 20, bankVoltageV: 12.9, currentA: -6 })).status).toBe(200);

    const r = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    expect(r.opened.length).toBeGreaterThan(0);
    await deliverAll(r.deliveryIds);
    const id = new URL((await db.select().from(pushSubscriptions).where(eq(pushSubscriptions.id, sub.subscriptionId)))[0]!.endpoint).pathname.split("/").pop()!;
    const got = await received(fake.url, id);
    expect(got.length).toBe(r.deliveryIds.length);
    expect(got[0]!.encoding).toBe("aes128gcm");
    expect(got[0]!.authorization).toMatch(/^vapid t=.+, k=.+/);
    expect(got[0]!.decrypted).toBeNull(); // the fake does not hold these keys: only the test does
    const texts = got.map((g) => decrypt(g, sub.keys) as { title: string; body: string; url: string });
    const runway = texts.find((t) => t.title === "Juniper: runway getting short")!;
    expect(runway.body).toMatch(/about \d+ h( \d+ min)? left at the loads switched on now/);
    expect(runway.body).toContain("expected to reach its cutoff at about");
    expect(runway.url).toBe(`http://tilldawn.test/rigs/${j.rig.id}`);
    // The engine's dawn plan, by default: the same sentence the evaluation computes from the
    // rig's model and the newest SoC (20 % at night falls short), with Juniper's load names.
    const model = (await getAsBuiltModel(db, j.rig.id))!.model;
    const state = withNewestSoc(await getRigState(db, j.rig.id), [{ takenAtMs: NIGHT_MS - 60_000, socPct: 20, bankVoltageV: 12.9, currentA: -6 }]).state;
    const line = alertDawnPlanLine(model, state, NIGHT_MS)!;
    expect(line).toMatch(/^(To make it to the next charge|Switching off every load that is not essential)/);
    expect(runway.body).toContain(line);
    // At 20 % at night not even the essential loads alone make it: the line says so.
    expect(line).toBe("Switching off every load that is not essential is not enough to reach the next charge: charge sooner if you can.");
    expect(texts.find((t) => t.title === "Juniper: won't make the next charge")!.body).toContain(line);
    // Encrypted: the plain text is nowhere in the bytes on the wire.
    expect(Buffer.from(got[0]!.bodyBase64, "base64").toString("latin1")).not.toContain("Juniper");
  });

  test("the falls-short push names the loads of the dawn plan: at 30 % the inverter (and the AC loads behind it) off makes it", async () => {
    const j = await makeJuniper(db);
    const sub = await subscribe(j.rig.id, j.guestCookie, `t-${crypto.randomUUID()}`);
    await savePreferences(db, j.rig.id, j.guest.id, { rules: ["falls_short"], quietStartMin: null, quietEndMin: null, timeZone: "America/Denver", push: true, email: false });
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    expect((await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 30 })).status).toBe(200);
    const r = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    await deliverAll(r.deliveryIds);
    const id = new URL((await db.select().from(pushSubscriptions).where(eq(pushSubscriptions.id, sub.subscriptionId)))[0]!.endpoint).pathname.split("/").pop()!;
    const texts = (await received(fake.url, id)).map((g) => decrypt(g, sub.keys) as { title: string; body: string });
    const falls = texts.find((t) => t.title === "Juniper: won't make the next charge")!;
    const model = (await getAsBuiltModel(db, j.rig.id))!.model;
    const inverter = model.inverters[0]!;
    expect(falls.body).toMatch(/^At the loads switched on now, Juniper's bank will run out before the sun at about/);
    expect(falls.body).toContain(`To make it to the next charge, 1 % above the floor: switch off ${inverter.name}`);
    expect(falls.body).toContain("(essential loads stay on;");
    // Without the plan (dawnPlanLine: null) the same alert has no plan sentence.
    const k = await makeJuniper(db, "Juniper two");
    await post(k.rig.id, (await createDeviceToken(db, { rigId: k.rig.id, name: "Shunt reader", createdBy: k.owner.id })).token, { takenAt: at(NIGHT_MS - 60_000), socPct: 30 });
    await savePreferences(db, k.rig.id, k.guest.id, { rules: ["falls_short"], quietStartMin: null, quietEndMin: null, timeZone: "America/Denver", push: false, email: true });
    await evaluateRig(db, k.rig.id, NIGHT_MS, { ...opts, dawnPlanLine: null });
    const [episode] = await db.select().from(alertEpisodes).where(and(eq(alertEpisodes.rigId, k.rig.id), eq(alertEpisodes.rule, "falls_short")));
    expect(episode!.body).not.toContain("To make it");
  });

  test("one alert per episode, an all clear when it ends, and a new alert when it comes back", async () => {
    const j = await makeJuniper(db);
    const sub = await subscribe(j.rig.id, j.guestCookie, `t-${crypto.randomUUID()}`);
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 20 });
    const first = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    const again = await evaluateRig(db, j.rig.id, NIGHT_MS + 60_000, opts);
    expect(first.opened.length).toBeGreaterThan(0);
    expect(again.opened).toEqual([]);
    expect(again.deliveryIds).toEqual([]);
    await deliverAll(first.deliveryIds);

    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS + 2 * 60_000), socPct: 95 });
    const clear = await evaluateRig(db, j.rig.id, NIGHT_MS + 3 * 60_000, opts);
    expect(clear.cleared.length).toBe(first.opened.length);
    expect(clear.deliveryIds.length).toBe(first.deliveryIds.length);
    await deliverAll(clear.deliveryIds);
    const rows = await db.select().from(alertDeliveries).where(eq(alertDeliveries.rigId, j.rig.id));
    expect(rows.filter((d) => d.phase === "clear" && d.status === "sent").length).toBe(first.deliveryIds.length);
    const texts = (await received(fake.url, new URL((await db.select().from(pushSubscriptions).where(eq(pushSubscriptions.id, sub.subscriptionId)))[0]!.endpoint).pathname.split("/").pop()!)).map(
      (g) => (decrypt(g, sub.keys) as { title: string }).title,
    );
    expect(texts.filter((t) => t === "Juniper: all clear").length).toBe(first.opened.length);

    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS + 4 * 60_000), socPct: 20 });
    const back = await evaluateRig(db, j.rig.id, NIGHT_MS + 5 * 60_000, opts);
    expect(back.opened.length).toBe(first.opened.length);
    const log = await listAlertLog(db, j.rig.id);
    expect(log.filter((e) => e.rule === "runway_low").length).toBe(2);
    expect(log.find((e) => e.rule === "runway_low" && e.clearedAt)!.deliveries.map((d) => `${d.phase}:${d.who}:${d.channel}:${d.status}`)).toEqual(["alert:Noor:push:sent", "clear:Noor:push:sent"]);
  });

  test("quiet hours hold back other rules but never the cutoff warning", async () => {
    const j = await makeJuniper(db);
    await subscribe(j.rig.id, j.guestCookie, `t-${crypto.randomUUID()}`);
    await savePreferences(db, j.rig.id, j.guest.id, { rules: ["runway_low", "falls_short"], quietStartMin: 21 * 60, quietEndMin: 7 * 60, timeZone: "America/Denver", push: true, email: false });
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 20 });
    await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    const rows = await db
      .select({ rule: alertEpisodes.rule, status: alertDeliveries.status })
      .from(alertDeliveries)
      .innerJoin(alertEpisodes, eq(alertEpisodes.id, alertDeliveries.episodeId))
      .where(eq(alertDeliveries.rigId, j.rig.id));
    expect(rows.find((r) => r.rule === "runway_low")!.status).toBe("pending");
    expect(rows.find((r) => r.rule === "falls_short")!.status).toBe("quiet");
    // soc_low was not chosen by this person: no delivery at all.
    expect(rows.some((r) => r.rule === "soc_low")).toBe(false);
  });

  test("a subscription the push service reports gone (410) is removed, and a failed push is retried", async () => {
    const j = await makeJuniper(db);
    const gone = await subscribe(j.rig.id, j.guestCookie, `gone-${crypto.randomUUID()}`);
    const flaky = await subscribe(j.rig.id, j.ownerCookie, `flaky-${crypto.randomUUID()}`);
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 20 });
    const r = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    const rows = await db.select().from(alertDeliveries).where(and(eq(alertDeliveries.rigId, j.rig.id), eq(alertDeliveries.channel, "push")));
    const goneRow = rows.find((d) => d.target === gone.subscriptionId)!;
    const flakyRow = rows.find((d) => d.target === flaky.subscriptionId)!;
    expect(r.deliveryIds).toContain(goneRow.id);
    expect(await deliverOne(db, goneRow.id, deps, { isRetry: false, isLast: false })).toBe("gone");
    expect(await db.select().from(pushSubscriptions).where(eq(pushSubscriptions.id, gone.subscriptionId))).toEqual([]);
    await expect(deliverOne(db, flakyRow.id, deps, { isRetry: false, isLast: false })).rejects.toBeInstanceOf(RetryLater);
    expect((await db.select().from(alertDeliveries).where(eq(alertDeliveries.id, flakyRow.id)))[0]!.status).toBe("retrying");
    expect(await deliverOne(db, flakyRow.id, deps, { isRetry: true, isLast: false })).toBe("sent");
    // Sent once: a second run of the same job finds nothing to claim.
    expect(await deliverOne(db, flakyRow.id, deps, { isRetry: true, isLast: false })).toBe("skipped");
  });

  test("e-mail fallback carries a one-click unsubscribe link and List-Unsubscribe headers; the link turns e-mail off", async () => {
    const j = await makeJuniper(db);
    await savePreferences(db, j.rig.id, j.guest.id, { rules: ["runway_low"], quietStartMin: null, quietEndMin: null, timeZone: "America/Denver", push: false, email: true });
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 20 });
    mails.length = 0;
    const r = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    await deliverAll(r.deliveryIds);
    expect(mails.length).toBe(1);
    const mail = mails[0]!;
    expect(mail.to).toBe(j.guest.email);
    expect(mail.subject).toBe("Juniper: runway getting short");
    const link = /(http:\/\/tilldawn\.test\/alerts\/unsubscribe\/[A-Za-z0-9_-]+)/.exec(mail.text)![1]!;
    expect(mail.headers?.["List-Unsubscribe"]).toBe(`<${link}>`);
    expect(mail.headers?.["List-Unsubscribe-Post"]).toBe("List-Unsubscribe=One-Click");
    const token = link.split("/").pop()!;
    // A mail program's one-click POST: no cookie, no Origin.
    const res = await callRoute(unsubscribeRoute.action, { path: `/alerts/unsubscribe/${token}`, form: { "List-Unsubscribe": "One-Click" }, origin: null, params: { token } });
    expect(res.status).toBe(200);
    const page = await callRoute(unsubscribeRoute.loader, { path: `/alerts/unsubscribe/${token}`, params: { token } });
    expect((page.body as { emailOn: boolean }).emailOn).toBe(false);
    expect((await callRoute(unsubscribeRoute.loader, { path: "/alerts/unsubscribe/nope", params: { token: "nope" } })).status).toBe(404);
    // A NUL in the token (found by the fuzz suite as a 500): refused as not found before any query.
    const nul = "a\u0000b".padEnd(32, "x");
    expect((await callRoute(unsubscribeRoute.loader, { path: "/alerts/unsubscribe/a%00b", params: { token: nul } })).status).toBe(404);
    expect((await callRoute(unsubscribeRoute.action, { path: "/alerts/unsubscribe/a%00b", form: { "List-Unsubscribe": "One-Click" }, origin: null, params: { token: nul } })).status).toBe(404);
  });

  test("the schedule's sweep catches a runway that ran short with no new reading", async () => {
    const j = await makeJuniper(db);
    await subscribe(j.rig.id, j.guestCookie, `t-${crypto.randomUUID()}`);
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 30 });
    const then = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    // Falls short of sunrise, but the runway (about 9 h from 30 %) is still long.
    expect((await db.select().from(alertEpisodes).where(eq(alertEpisodes.rigId, j.rig.id))).map((e) => e.rule)).toEqual(["falls_short"]);
    expect(then.opened.length).toBe(1);
    // Seven hours on, the same reading projected forward leaves less than 3 h.
    const later = await evaluateTimeBased(db, NIGHT_MS + 7 * 3_600_000, opts);
    const episodes = await db.select().from(alertEpisodes).where(eq(alertEpisodes.rigId, j.rig.id));
    expect(later.rigs).toBeGreaterThan(0);
    expect(episodes.map((e) => e.rule).sort()).toEqual(["falls_short", "runway_low"]);
  });

  test("someone who stops alerts before the push goes out is not sent it; an owner turning a rule off ends its episode", async () => {
    const j = await makeJuniper(db);
    const sub = await subscribe(j.rig.id, j.guestCookie, `t-${crypto.randomUUID()}`);
    const device = await createDeviceToken(db, { rigId: j.rig.id, name: "Shunt reader", createdBy: j.owner.id });
    await post(j.rig.id, device.token, { takenAt: at(NIGHT_MS - 60_000), socPct: 20 });
    const r = await evaluateRig(db, j.rig.id, NIGHT_MS, opts);
    expect(r.deliveryIds.length).toBeGreaterThan(0);
    await stopAlerts(db, j.rig.id, j.guest.id);
    await deliverAll(r.deliveryIds);
    const id = new URL((await db.select().from(pushSubscriptions).where(eq(pushSubscriptions.id, sub.subscriptionId)))[0]!.endpoint).pathname.split("/").pop()!;
    expect(await received(fake.url, id)).toEqual([]);
    const rules = await getRigRules(db, j.rig.id);
    await saveRigRules(db, j.rig.id, { ...rules, runway_low: { ...rules.runway_low, enabled: false } }, j.owner.id);
    const open = await db.select().from(alertEpisodes).where(and(eq(alertEpisodes.rigId, j.rig.id), eq(alertEpisodes.rule, "runway_low")));
    expect(open.length).toBe(1);
    expect(open[0]!.clearedAt).not.toBeNull();
  });

  test("owners edit the rig's rules on the Alerts page (with parked modes); guests may only set their own choices", async () => {
    const j = await makeJuniper(db);
    const form = { intent: "rules", "runway_low.enabled": "on", "runway_low.belowH": "4.5", "soc_low.floorPct": "", "voltage_low.belowV": "12.2", "voltage_low.enabled": "on", "no_reading.enabled": "on", "no_reading.afterH": "8", "no_reading.parkedModeIds": "storage" };
    const owner = await callRoute(alertsPage.action, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.ownerCookie, params: { rigId: j.rig.id }, form });
    expect(owner.status).toBe(200);
    const rules = await getRigRules(db, j.rig.id);
    expect(rules.runway_low).toEqual({ enabled: true, belowH: 4.5 });
    expect(rules.soc_low).toEqual({ enabled: false, floorPct: null });
    expect(rules.voltage_low).toEqual({ enabled: true, belowV: 12.2 });
    expect(rules.no_reading).toEqual({ enabled: true, afterH: 8, parkedModeIds: ["storage"] });
    const bad = await callRoute(alertsPage.action, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.ownerCookie, params: { rigId: j.rig.id }, form: { ...form, "runway_low.belowH": "500" } });
    expect(bad.status).toBe(400);
    expect((await callRoute(alertsPage.action, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.guestCookie, params: { rigId: j.rig.id }, form })).status).toBe(403);
    const mine = await callRoute(alertsPage.action, {
      path: `/rigs/${j.rig.id}/alerts`,
      cookie: j.guestCookie,
      params: { rigId: j.rig.id },
      form: { intent: "preferences", rule: "runway_low", quietStart: "22:00", quietEnd: "06:30", timeZone: "America/Denver", email: "on" },
    });
    expect(mine.status).toBe(200);
    const page = await callRoute(alertsPage.loader, { path: `/rigs/${j.rig.id}/alerts`, cookie: j.guestCookie, params: { rigId: j.rig.id } });
    const prefs = (page.body as { prefs: { rules: string[]; quietStartMin: number; quietEndMin: number; push: boolean; email: boolean } }).prefs;
    expect(prefs).toMatchObject({ rules: ["runway_low"], quietStartMin: 22 * 60, quietEndMin: 6 * 60 + 30, push: false, email: true });
    expect((page.body as { devices: unknown[] }).devices).toEqual([]);
  });
});
