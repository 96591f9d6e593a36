import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Browser } from "playwright-core";
import { baseUrl, launchBrowser, phoneContext } from "./browser";
import { juniperModel } from "../fixtures/juniper";
import { closeAuthDb, signIn } from "./auth";

let browser: Browser;
let close: () => Promise<void>;
beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
});
afterAll(async () => {
  await close?.();
  await closeAuthDb();
});

describe("Home page", () => {
  test("signed out, it shows what Tilldawn is and the way to sign in", async () => {
    const context = await phoneContext(browser);
    const page = await context.newPage();
    const response = await page.goto(baseUrl());
    expect(response?.status()).toBe(200);
    await page.getByRole("heading", { level: 1, name: "Will the bank last till dawn?" }).waitFor();
    await page.getByRole("main").getByRole("link", { name: "Sign in" }).waitFor();
    await context.close();
  });

  test("signed in as the demo owner, it opens the demo rig with its bank and a load, read from the database", async () => {
    const context = await phoneContext(browser);
    await signIn(context, "ada@juniper.example");
    const page = await context.newPage();
    const response = await page.goto(baseUrl());
    expect(response?.status()).toBe(200);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toContain("Juniper");
    const house = juniperModel.banks[0]!;
    await page.getByText(house.name).first().waitFor();
    const fridge = juniperModel.loads.find((l) => /fridge/i.test(l.name))!;
    await page.getByText(fridge.name).first().waitFor();
    await context.close();
  });

  test("an unknown address shows the friendly not-found page with a 404", async () => {
    const context = await phoneContext(browser);
    const page = await context.newPage();
    const response = await page.goto(`${baseUrl()}/no/such/page`);
    expect(response?.status()).toBe(404);
    await page.getByRole("heading", { name: "Page not found" }).waitFor();
    await context.close();
  });

  test("night mode turns the page red-only and is remembered after a reload", async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    await page.goto(baseUrl());
    await page.getByRole("button", { name: "Red night mode" }).first().click();
    await expect(page.evaluate(() => document.documentElement.classList.contains("night"))).resolves.toBe(true);
    await page.reload();
    await expect(page.evaluate(() => document.documentElement.classList.contains("night"))).resolves.toBe(true);
    // Every colour on the body is a shade of red (green and blue channels at zero).
    const color = await page.evaluate(() => getComputedStyle(document.body).color);
    expect(color).toMatch(/^rgb\(\d+, 0, 0\)$/);
    await context.close();
  });
});
