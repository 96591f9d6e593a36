// The logbook as a phone shows it: a card per reading, a chart whose axes make sense, times
// in the rig's zone on the person's clock, temperatures in their unit, plain wording.
import { beforeAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import type { Page } from "playwright-core";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";
import { userPreferences, users } from "~/db/schema";
import { createRig } from "~/repos/rigs.server";
import { applySync } from "~/repos/sync.server";
import { juniperModel } from "../fixtures/juniper";

const juniper = setUpJuniper();
const stamp = Date.now();
const ownerEmail = `logbook-${stamp}@juniper.example`;
let rigId = "";
// One reading two days ago, at a whole minute: 14 °C, 13.21 V, −3.5 A, 80 %.
const takenAt = Math.floor((Date.now() - 2 * 86_400_000) / 60_000) * 60_000;

beforeAll(async () => {
  const { db } = juniper;
  const [owner] = await db.insert(users).values({ email: ownerEmail, name: "Ada's tester" }).returning();
  const { rig } = await createRig(db, { name: `Juniper ${stamp}`, ownerId: owner!.id, document: { ...juniperModel, name: `Juniper ${stamp}` }, message: "test rig" });
  rigId = rig.id;
  const reading = { id: crypto.randomUUID(), takenAt: new Date(takenAt).toISOString(), bankVoltageV: 13.21, currentA: -3.5, socPct: 80, temperatureC: 14, note: "a note about the fridge cycling twice in an hour", source: "hand" };
  await applySync(db, { userId: owner!.id, role: "owner" }, { rigId, cursor: null, changes: [{ id: crypto.randomUUID(), kind: "reading.add", rigId, clientTime: new Date().toISOString(), payload: { reading } }] });
});

async function setPrefs(prefs: { clock?: "24h" | "12h"; temperatureUnit?: "c" | "f" }) {
  const [u] = await juniper.db.select().from(users).where(eq(users.email, ownerEmail));
  await juniper.db
    .insert(userPreferences)
    .values({ userId: u!.id, ...prefs })
    .onConflictDoUpdate({ target: userPreferences.userId, set: prefs });
}

async function openLog(page: Page) {
  await page.goto(`${baseUrl()}/rigs/${rigId}/log`, { waitUntil: "networkidle" });
  await page.locator("[data-reading-id]:visible").first().waitFor();
}

// What an independent formatter (the platform's Intl, not Tilldawn's code) says the rig's clock read.
const rigClock = (hour12: boolean) =>
  new Intl.DateTimeFormat("en-US", { timeZone: juniperModel.timeZone, hour: "numeric", minute: "2-digit", hour12 }).format(new Date(takenAt)).replace(/\s/g, " ");
const flat = (s: string) => s.replace(/\s/g, " ");

describe("The logbook on a phone", () => {
  test("under 640 px each reading is a card with time, V, A, SoC, note, sync state and its actions on screen", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await openLog(page);
    expect(await page.locator("table:visible").count()).toBe(0);
    const card = page.locator("[data-readings=cards] [data-reading-id]").first();
    const text = flat(await card.innerText());
    for (const part of ["13.21 V", "\u22123.5 A", "80 %", "fridge cycling", "Synced"]) expect(text).toContain(part);
    for (const name of [/^Edit/, /^Delete/]) {
      const box = (await card.getByRole(name.source.includes("Edit") ? "link" : "button", { name }).boundingBox())!;
      expect(box.x + box.width).toBeLessThanOrEqual(390);
      expect(box.height).toBeGreaterThanOrEqual(44);
    }
    const voltage = (await card.getByText("13.21 V").boundingBox())!;
    expect(voltage.height).toBeLessThan(30); // one line: "13.21 V" does not wrap
    await context.close();
  });

  test("a wide screen keeps the table", async () => {
    const context = await juniper.browser.newContext({ viewport: { width: 1100, height: 900 } });
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await openLog(page);
    await page.getByRole("table", { name: "Readings, newest first" }).waitFor();
    expect(await page.locator("[data-readings=cards]:visible").count()).toBe(0);
    await context.close();
  });

  test("with one reading the chart spans hours around it, the voltage axis hugs 13.21 V with unique ticks, and the legend shows values", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await openLog(page);
    const figure = page.locator("figure[data-v-ticks]");
    await page.waitForFunction(() => (document.querySelector("figure[data-v-ticks]")?.getAttribute("data-v-ticks") ?? "") !== "");
    const [x0, x1] = (await figure.getAttribute("data-x-range"))!.split("..").map(Number);
    expect(x1! - x0!).toBeLessThanOrEqual(4 * 3600);
    const [v0, v1] = (await figure.getAttribute("data-v-range"))!.split("..").map(Number);
    expect(v0).toBeGreaterThan(12);
    expect(v1).toBeLessThan(14.5);
    const ticks = (await figure.getAttribute("data-v-ticks"))!.split(" ");
    expect(ticks.length).toBeGreaterThan(1);
    expect(new Set(ticks).size).toBe(ticks.length);
    // Time ticks in the app's clock (24-hour by default), not the browser's "11/29" style.
    const xTicks = (await figure.getAttribute("data-x-ticks"))!.split(" | ");
    expect(xTicks.length).toBeGreaterThan(1);
    for (const t of xTicks) expect(t).toMatch(/^\d{2}:\d{2}$/);
    const legend = flat(await page.locator("[data-chart-legend]").innerText());
    expect(legend).toContain("13.21 V");
    expect(legend).toContain("80 %");
    expect(legend).not.toContain("--");
    await context.close();
  });

  test("times are the rig's clock, not the phone's, on the person's 12- or 24-hour clock; temperatures in their unit", async () => {
    // The phone sits in Tokyo; the rig in America/Denver.
    const context = await juniper.browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true, timezoneId: "Asia/Tokyo" });
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await setPrefs({ clock: "24h", temperatureUnit: "c" });
    await openLog(page);
    const card = page.locator("[data-readings=cards] [data-reading-id]").first();
    const h24 = new Intl.DateTimeFormat("en-GB", { timeZone: juniperModel.timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(new Date(takenAt));
    expect(flat(await card.innerText())).toContain(h24);
    expect(flat(await card.innerText())).toContain("14 °C");

    await setPrefs({ clock: "12h", temperatureUnit: "f" });
    await openLog(page);
    const text = flat(await page.locator("[data-readings=cards] [data-reading-id]").first().innerText());
    expect(text).toContain(rigClock(true));
    // 14 °C is 57.2 °F (°F = °C × 9/5 + 32, NIST SP 811), shown to the degree.
    expect(text).toContain("57 °F");
    await setPrefs({ clock: "24h", temperatureUnit: "c" });
    await context.close();
  });
});

describe("Logbook wording and pages", () => {
  test("a direct import link in a fresh browser opens the import, with a page title", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/rigs/${rigId}/log/import`, { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "Import readings from a CSV file" }).waitFor();
    expect(await page.title()).toBe(`Import readings · Juniper ${stamp} · Tilldawn`);
    await context.close();
  });

  test("a guest at the import page is told what they may do instead, not an error code", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, "noor@juniper.example");
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/rigs/${juniper.rigId}/log/import`, { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "Importing is for the rig's crew" }).waitFor();
    expect(await page.getByText(/403|Internal Server Error/).count()).toBe(0);
    await page.getByRole("link", { name: "Export the readings as CSV" }).waitFor();
    await context.close();
  });

  test("the reading-edit and not-found pages have titles", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await openLog(page);
    await page.locator("[data-readings=cards] [data-reading-id]").first().getByRole("link", { name: /^Edit/ }).click();
    await page.getByRole("heading", { name: /^Reading of / }).waitFor();
    expect(await page.title()).toBe(`Reading · Logbook · Juniper ${stamp} · Tilldawn`);
    await page.goto(`${baseUrl()}/no/such/page`);
    await page.getByRole("heading", { name: "Page not found" }).waitFor();
    expect(await page.title()).toBe("Page not found · Tilldawn");
    await context.close();
  });
});

describe("Other slips", () => {
  test("POST to the readings API answers 405 as JSON", async () => {
    const res = await fetch(`${baseUrl()}/api/rigs/${juniper.rigId}/readings`, { method: "POST", body: "{}", headers: { "content-type": "application/json" } });
    // Without a session the guard may answer first (401/403); with one, 405. Both are JSON.
    expect(res.headers.get("content-type")).toMatch(/application\/json/);
    const context = await phoneContext(juniper.browser);
    await signIn(context, "ada@juniper.example");
    const page = await context.newPage();
    // From a page of the app (an API answer's own CSP allows no fetches from it).
    await page.goto(`${baseUrl()}/`);
    const answer = await page.evaluate(async (url) => {
      const r = await fetch(url, { method: "POST", body: "{}", headers: { "content-type": "application/json" } });
      return { status: r.status, body: await r.json().catch(() => null) };
    }, `${baseUrl()}/api/rigs/${juniper.rigId}/readings`);
    expect(answer.status).toBe(405);
    expect(answer.body).toMatchObject({ error: { code: "method_not_allowed" } });
    await context.close();
  });

  test("the owner is offered no role change on themselves", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, ownerEmail);
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/rigs/${rigId}/members`, { waitUntil: "networkidle" });
    await page.getByText("Your own role can be changed by another owner of the rig.").waitFor();
    expect(await page.getByRole("button", { name: "Change role" }).count()).toBe(0);
    await context.close();
  });
});
