// The Now screen in Chromium on a phone-sized viewport, against the built app and the seeded Juniper rig.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { baseUrl, launchBrowser, phoneContext } from "./browser";
import { closeAuthDb, signIn } from "./auth";

let browser: Browser;
let close: () => Promise<void>;
let rigId: string;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  // The demo rig's id, from the rigs list of its owner.
  const context = await phoneContext(browser);
  await signIn(context, "ada@juniper.example");
  const page = await context.newPage();
  await page.goto(`${baseUrl()}/rigs`);
  const href = await page.getByRole("link", { name: /Juniper/ }).first().getAttribute("href");
  rigId = href!.split("/").pop()!;
  await context.close();
});
afterAll(async () => {
  await close?.();
  await closeAuthDb();
});

async function openNow(email: string): Promise<{ context: BrowserContext; page: Page }> {
  const context = await phoneContext(browser);
  await signIn(context, email);
  const page = await context.newPage();
  const res = await page.goto(`${baseUrl()}/rigs/${rigId}`);
  expect(res?.status()).toBe(200);
  await page.getByTestId("runway").waitFor();
  // Hydrated: the lazy chart has drawn.
  await page.locator("[data-testid=projection-chart] canvas").waitFor();
  return { context, page };
}

const runway = (page: Page) => page.getByTestId("runway").textContent();

async function chooseMode(page: Page, name: string) {
  await page.getByRole("button", { name, exact: true }).click();
  await expect.poll(() => page.getByRole("button", { name, exact: true }).getAttribute("aria-pressed")).toBe("true");
  await expect.poll(() => page.getByTestId("sync-status").textContent(), { timeout: 10_000 }).toBe("Saved");
}

describe("Now screen on a phone", () => {
  test("switching a load off changes the runway at once and the change is saved for everyone", async () => {
    const { context, page } = await openNow("sam@juniper.example");
    await chooseMode(page, "Parked night");
    const before = await runway(page);
    const dish = page.getByRole("switch", { name: "Satellite internet dish" });
    expect(await dish.getAttribute("aria-checked")).toBe("true");
    await dish.click();
    expect(await dish.getAttribute("aria-checked")).toBe("false");
    await expect.poll(() => runway(page), { timeout: 5_000 }).not.toBe(before);
    await expect.poll(() => page.getByTestId("sync-status").textContent(), { timeout: 10_000 }).toBe("Saved");
    const after = await runway(page);
    await page.reload();
    await page.getByTestId("runway").waitFor();
    expect(await page.getByRole("switch", { name: "Satellite internet dish" }).getAttribute("aria-checked")).toBe("false");
    expect(await runway(page)).toBe(after);
    await context.close();
  });

  test("applying a mode sets every switch at once", async () => {
    const { context, page } = await openNow("sam@juniper.example");
    await chooseMode(page, "Storage");
    for (const name of ["Compressor fridge", "LED lights", "Induction hob"]) {
      expect(await page.getByRole("switch", { name }).getAttribute("aria-checked")).toBe("false");
    }
    expect(await page.getByRole("switch", { name: "CO and gas alarm" }).getAttribute("aria-checked")).toBe("true");
    await chooseMode(page, "Parked night");
    expect(await page.getByRole("switch", { name: "Compressor fridge" }).getAttribute("aria-checked")).toBe("true");
    await context.close();
  });

  test("a resting voltage gives an estimated SoC with its confidence, and a bad value is refused with a message", async () => {
    const { context, page } = await openNow("sam@juniper.example");
    await page.getByRole("button", { name: "Update SoC" }).click();
    const dialog = page.getByRole("dialog", { name: "State of charge" });
    await dialog.getByRole("tab", { name: "Resting voltage" }).click();
    const volts = dialog.getByLabel("Resting voltage of the bank (V)");
    await volts.fill("3");
    await dialog.getByRole("button", { name: "Save" }).click();
    await expect.poll(() => dialog.getByRole("alert").textContent()).toMatch(/resting voltage, e\.g\./);
    await volts.fill("13.3");
    await expect.poll(() => dialog.textContent()).toMatch(/About \d+ %.*low confidence/);
    expect(await dialog.textContent()).toContain("cannot tell the SoC");
    await dialog.getByRole("button", { name: "Save" }).click();
    await expect.poll(() => page.getByText(/estimated from a resting voltage, just now/).count()).toBe(1);
    await expect.poll(() => page.getByTestId("sync-status").textContent(), { timeout: 10_000 }).toBe("Saved");
    await context.close();
  });

  test("a guest sees no controls, and sees the crew's switch within a minute", async () => {
    const guest = await openNow("noor@juniper.example");
    expect(await guest.page.getByRole("switch").count()).toBe(0);
    expect(await guest.page.getByRole("button", { name: "Update SoC" }).count()).toBe(0);
    expect(await guest.page.getByTestId("sync-status").textContent()).toBe("Read-only (guest)");
    const before = await runway(guest.page);

    const crew = await openNow("sam@juniper.example");
    const hob = crew.page.getByRole("switch", { name: "Induction hob" });
    const wasOn = (await hob.getAttribute("aria-checked")) === "true";
    await hob.click();
    await expect.poll(() => crew.page.getByTestId("sync-status").textContent(), { timeout: 10_000 }).toBe("Saved");
    const crewRunway = await runway(crew.page);
    expect(crewRunway).not.toBe(before);

    await expect.poll(() => runway(guest.page), { timeout: 60_000, interval: 1000 }).toBe(crewRunway);
    // Put it back for the other tests.
    if (wasOn) await crew.page.getByRole("switch", { name: "Induction hob" }).click();
    await crew.context.close();
    await guest.context.close();
  });

  test("tapping the runway explains how it was computed", async () => {
    const { context, page } = await openNow("noor@juniper.example");
    await page.getByTestId("runway").click();
    const dialog = page.getByRole("dialog", { name: "How: Runway" });
    await dialog.waitFor();
    expect(await dialog.textContent()).toMatch(/usable floor/);
    expect(await dialog.textContent()).toMatch(/Formula/);
    await dialog.getByRole("button", { name: "Close" }).click();
    await context.close();
  });
});
