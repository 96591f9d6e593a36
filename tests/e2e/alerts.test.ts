// Warn me in Chromium: subscribe (the notification permission granted to the context), a
// device posts readings that take the runway under 3 h, and the alert arrives at the fake push
// service (decrypted there: the fake made the subscription's keys) and shows in the alert log.
//
// Headless Chromium cannot reach a real push service, so the page's PushManager.subscribe is
// replaced (in this test only) by one that answers a subscription made by the push fake, with
// the fake's endpoint and keys. Everything after that is the real app: the "Warn me" button,
// the API, the device ingest, the worker, web-push's encryption and the service worker.
import { and, eq } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { pushSubscriptions, rigMembers, users } from "~/db/schema";
import { createRig } from "~/repos/rigs.server";
import { juniperModel } from "../fixtures/juniper";
import { signIn } from "./auth";
import { baseUrl, phoneContext } from "./browser";
import { setUpJuniper } from "./juniper";

const juniper = setUpJuniper();
const pushUrl = () => process.env.E2E_PUSH_URL ?? "http://127.0.0.1:4310";

describe("Warn me", () => {
  test("a guest subscribes, a device's readings take the runway under 3 h, the push arrives and the alert log shows it", async () => {
    const { db } = juniper;
    // A rig and people of this test's own (the demo people's rigs stay as seeded): an owner and a guest.
    const tag = Date.now();
    const [ada] = await db.insert(users).values({ email: `ada-alerts-${tag}@juniper.example`, name: "Ada" }).returning();
    const [noor] = await db.insert(users).values({ email: `noor-alerts-${tag}@juniper.example`, name: "Noor" }).returning();
    const name = `Juniper alerts ${tag}`;
    const { rig } = await createRig(db, { name, ownerId: ada!.id, document: juniperModel });
    await db.insert(rigMembers).values({ rigId: rig.id, userId: noor!.id, role: "guest" });

    // Noor's phone: notifications allowed, the subscription made by the push fake.
    const sub = (await (await fetch(`${pushUrl()}/subscriptions`, { method: "POST" })).json()) as { endpoint: string; keys: { p256dh: string; auth: string } };
    const noorCtx = await phoneContext(juniper.browser);
    await noorCtx.grantPermissions(["notifications"], { origin: baseUrl() });
    await noorCtx.addInitScript((s) => {
      const fakeSub = { endpoint: s.endpoint, expirationTime: null, options: {}, toJSON: () => s, unsubscribe: async () => true, getKey: () => null };
      let made = false;
      PushManager.prototype.subscribe = async function () {
        made = true;
        return fakeSub as unknown as PushSubscription;
      };
      PushManager.prototype.getSubscription = async function () {
        return (made ? fakeSub : null) as unknown as PushSubscription | null;
      };
    }, sub);
    await signIn(noorCtx, noor!.email);
    const noor_ = await noorCtx.newPage();
    await noor_.goto(`${baseUrl()}/rigs/${rig.id}/alerts`);
    await noor_.getByRole("heading", { name: `Alerts for ${name}` }).waitFor();
    // The service worker must be active before subscribing (the page registers it).
    await noor_.evaluate(() => navigator.serviceWorker.ready.then(() => true));
    await noor_.getByRole("button", { name: "Warn me" }).click();
    await noor_.getByText("This phone will be warned before the cutoff.").waitFor();
    const rows = await db.select().from(pushSubscriptions).where(and(eq(pushSubscriptions.userId, noor!.id), eq(pushSubscriptions.endpoint, sub.endpoint)));
    expect(rows.length).toBe(1);
    expect(rows[0]!.p256dh).toBe(sub.keys.p256dh);
    await noor_.getByRole("heading", { name: "What I hear about" }).waitFor();

    // Ada creates a device token on the same page (shown once).
    const adaCtx = await phoneContext(juniper.browser);
    await signIn(adaCtx, ada!.email);
    const ada_ = await adaCtx.newPage();
    await ada_.goto(`${baseUrl()}/rigs/${rig.id}/alerts`);
    await ada_.getByLabel("Device name").fill("Shunt reader");
    await ada_.getByRole("button", { name: "Create token" }).click();
    const token = (await ada_.locator("[data-device-token]").textContent())!.trim();
    expect(token).toMatch(/^tdd_/);

    // Put the rig where it is night right now (local solar midnight), so the runway does not
    // depend on when this test runs.
    const now = new Date();
    const utcH = now.getUTCHours() + now.getUTCMinutes() / 60;
    const lonDeg = ((((0 - utcH) * 15 + 540) % 360) - 180);
    const place = await adaCtx.request.post(`${baseUrl()}/api/rigs/${rig.id}/state`, {
      headers: { origin: baseUrl() },
      data: { baseVersion: 0, change: { kind: "place", place: { kind: "typed", latDeg: 38.5, lonDeg }, weather: { kind: "overcast" } } },
    });
    expect(place.status()).toBe(200);

    // The device aboard posts a batch: the last one at 18 % SoC, about 2 h above the 15 % floor
    // (Juniper draws about 1.6 % an hour at night), so the runway is well under 3 h.
    const times = [30, 20, 10, 1].map((m) => new Date(Date.now() - m * 60_000).toISOString());
    const res = await fetch(`${baseUrl()}/api/v1/rigs/${rig.id}/readings`, {
      method: "POST",
      headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
      body: JSON.stringify({ readings: times.map((takenAt, i) => ({ takenAt, socPct: 21 - i, bankVoltageV: 13.0, currentA: -8 })) }),
    });
    expect(res.status).toBe(200);
    expect(((await res.json()) as { stored: number }).stored).toBe(4);

    // The worker evaluates, web-push encrypts, the fake receives and decrypts.
    const id = new URL(sub.endpoint).pathname.split("/").pop()!;
    let texts: Array<{ title: string; body: string; url: string }> = [];
    for (let i = 0; i < 100 && !texts.some((t) => t.title.includes("runway getting short")); i++) {
      const got = (await (await fetch(`${pushUrl()}/messages?subscription=${id}`)).json()) as Array<{ decrypted: string | null }>;
      texts = got.flatMap((g) => (g.decrypted ? [JSON.parse(g.decrypted) as { title: string; body: string; url: string }] : []));
      await new Promise((r) => setTimeout(r, 200));
    }
    const alert = texts.find((t) => t.title === `${name}: runway getting short`);
    expect(alert, JSON.stringify(texts)).toBeTruthy();
    expect(alert!.body).toContain("expected to reach its cutoff at about");
    expect(alert!.url).toBe(`${baseUrl()}/rigs/${rig.id}`);

    // The development page lists it; the alert log shows who was told and how.
    await noor_.goto(`${baseUrl()}/dev/push`);
    await noor_.getByText(`${name}: runway getting short`).first().waitFor();
    await noor_.goto(`${baseUrl()}/rigs/${rig.id}/alerts`);
    const entry = noor_.locator('[data-alert-rule="runway_low"]');
    await entry.waitFor();
    await expect(entry.textContent()).resolves.toContain("Alert to Noor by push: delivered");

    // The readings are in the logbook as the device's.
    await noor_.goto(`${baseUrl()}/rigs/${rig.id}/log`);
    await noor_.getByText("Shunt reader").first().waitFor();
    await noorCtx.close();
    await adaCtx.close();
  });
});
