// Offline first in Chromium: the installed app opens, computes and takes readings with no
// network, then syncs exactly once when the connection returns — even across a server crash.
import { spawn, type ChildProcess } from "node:child_process";
import { fileURLToPath } from "node:url";
import { describe, expect, test } from "vitest";
import { and, eq, gte, like, sql } from "drizzle-orm";
import type { Page } from "playwright-core";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";
import { demoPerson } from "../fixtures/demo";
import { readings, switchChanges, users } from "~/db/schema";
import { createSession, SESSION_COOKIE } from "~/auth/session.server";

const root = fileURLToPath(new URL("../..", import.meta.url));
const juniper = setUpJuniper();
const { db } = juniper;

const tagged = (tag: string) => db.select().from(readings).where(and(eq(readings.rigId, juniper.rigId), like(readings.note, `${tag}%`)));

/** Opens a page online until the service worker controls it and the phone's store holds the rig. */
async function installOnline(page: Page, origin: string) {
  await page.goto(`${origin}/rigs/${juniper.rigId}/log`);
  await page.getByRole("heading", { name: "Logbook" }).waitFor();
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
  // A second load is controlled by the worker; the pages it keeps are cached by now.
  await page.reload();
  await page.getByRole("heading", { name: "Logbook" }).waitFor();
  await expect.poll(() => page.evaluate(() => navigator.serviceWorker.controller !== null), { timeout: 10_000 }).toBe(true);
  await page.goto(`${origin}/rigs/${juniper.rigId}`);
  await page.getByTestId("runway").waitFor();
  await expect
    .poll(() => page.evaluate(async (id) => (await caches.open("tilldawn-pages").then((c) => c.keys())).some((r) => r.url.endsWith(`/rigs/${id}/log`)), juniper.rigId), { timeout: 10_000 })
    .toBe(true);
}

async function addReading(page: Page, values: { v: string; a: string; soc: string; note: string }) {
  const box = (name: string) => page.getByRole("textbox", { name, exact: true });
  await box("Bank voltage").fill(values.v);
  await box("State of charge").fill(values.soc);
  await box("Current").fill(values.a);
  if (!(await box("Note").isVisible())) await page.getByText("Time, temperature, solar, note").click();
  await box("Note").fill(values.note);
  await page.getByRole("button", { name: "Save reading" }).click();
  await page.getByText("Reading saved on this phone.").waitFor();
}

const waiting = (page: Page) => page.locator("[data-sync-state]").first().getAttribute("data-waiting");
const syncState = (page: Page) => page.locator("[data-sync-state]").first().getAttribute("data-sync-state");

describe("Offline first in Chromium", () => {
  test("offline: reload, move between Now and the Logbook, add three readings, switch a load; online: each lands in PostgreSQL once and another member sees them", async () => {
    const tag = `e2e-offline-${Date.now()}`;
    const started = new Date();
    const context = await phoneContext(juniper.browser);
    const samId = await signIn(context, demoPerson("crew").email);
    const page = await context.newPage();
    await installOnline(page, baseUrl());

    await context.setOffline(true);
    await page.reload();
    await page.getByTestId("runway").waitFor();
    expect(await page.getByTestId("runway").textContent()).toMatch(/\d/);

    // Now → Logbook → Now → the rig's read views → Logbook, all without a network, from what
    // the phone kept. (The circuit map does not exist yet.)
    await page.getByRole("link", { name: "Logbook" }).first().click();
    await page.getByRole("heading", { name: "Logbook" }).waitFor();
    await page.getByRole("link", { name: "Juniper" }).first().click();
    await page.getByTestId("runway").waitFor();
    await page.getByRole("link", { name: "Rig as built" }).click();
    await page.getByText(/As built, revision \d+/).waitFor();
    await page.getByText("Compressor fridge").first().waitFor();
    await page.getByRole("link", { name: "Back to Now" }).click();
    await page.getByTestId("runway").waitFor();
    await page.getByRole("link", { name: "Day budget" }).click();
    await page.getByRole("heading", { name: "By load" }).waitFor();
    await page.getByRole("link", { name: "Back to Now" }).click();
    await page.getByTestId("runway").waitFor();
    await page.getByRole("link", { name: "Logbook" }).first().click();
    await page.getByRole("heading", { name: "Logbook" }).waitFor();

    for (const [i, v] of ["13.21", "13.18", "13.15"].entries()) {
      await addReading(page, { v, a: "4.2", soc: String(78 - i), note: `${tag} #${i + 1}` });
    }
    await expect.poll(() => waiting(page)).toBe("3");
    expect(await syncState(page)).toBe("offline");
    expect(await page.getByText("Saved on phone").count()).toBeGreaterThanOrEqual(3);

    // Switch a load on the Now screen, still offline.
    await page.getByRole("link", { name: "Juniper" }).first().click();
    await page.getByTestId("runway").waitFor();
    const pump = page.getByRole("switch", { name: "Water pump" });
    const wasOn = (await pump.getAttribute("aria-checked")) === "true";
    await pump.click();
    await expect.poll(() => pump.getAttribute("aria-checked")).toBe(wasOn ? "false" : "true");
    expect(await tagged(tag)).toHaveLength(0);

    await context.setOffline(false);
    await page.getByRole("link", { name: "Logbook" }).first().click();
    await expect.poll(() => waiting(page), { timeout: 20_000 }).toBe("0");
    await expect.poll(() => syncState(page), { timeout: 20_000 }).toBe("idle");

    const stored = await tagged(tag);
    expect(stored.map((r) => r.note).sort()).toEqual([1, 2, 3].map((n) => `${tag} #${n}`));
    expect(stored.every((r) => r.authorId === samId && r.currentA === -4.2)).toBe(true);
    const switched = await db
      .select()
      .from(switchChanges)
      .where(and(eq(switchChanges.rigId, juniper.rigId), eq(switchChanges.loadId, "water-pump"), eq(switchChanges.authorId, samId), gte(switchChanges.serverTime, started)));
    expect(switched.map((s) => s.on)).toEqual([!wasOn]);

    // Ada, on another phone, sees the three readings.
    const other = await phoneContext(juniper.browser);
    await signIn(other, demoPerson("owner").email);
    const adaPage = await other.newPage();
    await adaPage.goto(`${baseUrl()}/rigs/${juniper.rigId}/log`);
    for (const n of [1, 2, 3]) await adaPage.getByText(`${tag} #${n}`).filter({ visible: true }).waitFor({ timeout: 15_000 });
    await other.close();
    await context.close();
  });

  test("the server dies after applying a sync but before answering; after a restart nothing is lost and nothing is doubled", async () => {
    const port = Number(process.env.E2E_CRASH_PORT ?? 3298);
    const origin = `http://127.0.0.1:${port}`;
    let server = await startServer(port);
    const tag = `e2e-crash-${Date.now()}`;
    const context = await phoneContext(juniper.browser);
    const [sam] = await db.select().from(users).where(eq(users.email, demoPerson("crew").email));
    const { setCookie } = await createSession(db, sam!.id, "crash test");
    await context.addCookies([{ name: SESSION_COOKIE, value: setCookie.split(";")[0]!.slice(SESSION_COOKIE.length + 1), url: origin, httpOnly: true, sameSite: "Lax" }]);
    const page = await context.newPage();
    try {
      await installOnline(page, origin);
      await page.getByRole("link", { name: "Logbook" }).first().click();
      await page.getByRole("heading", { name: "Logbook" }).waitFor();
      await context.setOffline(true);
      for (const i of [1, 2, 3, 4]) await addReading(page, { v: "13.2", a: "2", soc: "70", note: `${tag} #${i}` });

      // The first sync reaches the server and is applied; then the server dies before its answer arrives.
      let crashed = false;
      await context.route("**/api/sync", async (route) => {
        if (crashed) return route.continue();
        crashed = true;
        const answer = await route.fetch();
        expect(answer.status()).toBe(200);
        server.kill("SIGKILL");
        await new Promise((r) => server.once("exit", r));
        await route.abort("connectionreset");
      });
      await context.setOffline(false);
      // The state this part needs: the server stored the batch, and the phone never heard so.
      // While the server is down no sync can succeed, so the phone keeps all four waiting.
      await expect.poll(async () => (await tagged(tag)).length, { timeout: 20_000 }).toBe(4);
      await expect.poll(() => server.exitCode !== null || server.signalCode !== null, { timeout: 20_000 }).toBe(true);
      await expect.poll(() => syncState(page), { timeout: 20_000 }).toBe("error");
      expect(await waiting(page)).toBe("4");

      server = await startServer(port);
      // The runner's own backoff retries, or the browser's "online" nudges it at once: either
      // path is fine. The test waits for the outcome (outbox empty, rows stored once), not for
      // a Retry button that a retry may already have made unnecessary.
      await page.evaluate(() => window.dispatchEvent(new Event("online")));
      await expect.poll(() => waiting(page), { timeout: 30_000 }).toBe("0");
      await expect.poll(() => syncState(page), { timeout: 30_000 }).toBe("idle");
      const stored = await tagged(tag);
      expect(stored).toHaveLength(4);
      const [count] = await db.select({ n: sql<number>`count(distinct ${readings.note})::int` }).from(readings).where(like(readings.note, `${tag}%`));
      expect(count!.n).toBe(4);
    } finally {
      await context.close();
      server.kill("SIGTERM");
    }
  });

  test("the manifest is installable and the service worker precaches the app shell and every route's assets", async () => {
    const manifest = (await (await fetch(`${baseUrl()}/manifest.webmanifest`)).json()) as Record<string, unknown> & { icons: Array<{ src: string; sizes: string; purpose?: string }> };
    expect(manifest).toMatchObject({ name: "Tilldawn", display: "standalone", start_url: "/", theme_color: expect.stringMatching(/^#/) });
    expect(manifest.icons.some((i) => i.sizes === "192x192")).toBe(true);
    expect(manifest.icons.some((i) => i.sizes === "512x512")).toBe(true);
    expect(manifest.icons.some((i) => i.purpose === "maskable")).toBe(true);
    for (const icon of manifest.icons) expect((await fetch(`${baseUrl()}${icon.src}`)).status).toBe(200);

    const sw = await (await fetch(`${baseUrl()}/sw.js`)).text();
    const { readdir } = await import("node:fs/promises");
    const built = (await readdir(`${root}build/client/assets`)).filter((f) => f.endsWith(".js") || f.endsWith(".css"));
    expect(built.length).toBeGreaterThan(5);
    for (const file of built) expect(sw).toContain(`assets/${file}`);
    expect(built.some((f) => /^manifest-.*\.js$/.test(f))).toBe(true);
    expect(built.some((f) => /^rig\.log-.*\.js$/.test(f))).toBe(true);

    // Chromium sees the page as installable: a manifest link and an active worker controlling it.
    const context = await phoneContext(juniper.browser);
    const page = await context.newPage();
    await page.goto(baseUrl());
    expect(await page.locator('link[rel="manifest"]').getAttribute("href")).toBe("/manifest.webmanifest");
    await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
    expect(await page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.active?.scriptURL)).toMatch(/\/sw\.js$/);
    await context.close();
  });
});

async function startServer(port: number): Promise<ChildProcess> {
  const origin = `http://127.0.0.1:${port}`;
  const child = spawn(process.execPath, [`${root}scripts/serve.mjs`, "./build/server/index.js"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", PORT: String(port), APP_URL: origin },
    stdio: ["ignore", "ignore", "inherit"],
  });
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the second server exited with ${child.exitCode}`);
    try {
      await fetch(`${origin}/api/health`);
      return child;
    } catch {
      if (Date.now() > deadline) throw new Error("the second server did not start within 30 s");
      await new Promise((r) => setTimeout(r, 100));
    }
  }
}
