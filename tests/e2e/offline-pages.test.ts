// Every page in the navigation opens offline: People, Rigs and Account from the copy the phone
// kept when last shown online (or a plain "needs a connection"), and the badge says "Offline".
import { describe, expect, test } from "vitest";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";

const juniper = setUpJuniper();

describe("Offline, every page in the navigation", () => {
  test("People, Rigs and Account open from the phone's copy, and the sync badge says Offline", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, "sam@juniper.example");
    const page = await context.newPage();
    const r = juniper.rigId;
    // Online once: the logbook (keeps the rig), then each page (keeps its copy).
    await page.goto(`${baseUrl()}/rigs/${r}/log`, { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "Logbook" }).waitFor();
    for (const [path, heading] of [[`/rigs/${r}/members`, "People on this rig"], ["/rigs", "Rigs"], ["/account", "Account"]] as const) {
      await page.goto(`${baseUrl()}${path}`, { waitUntil: "networkidle" });
      await page.getByRole("heading", { name: heading, exact: true }).waitFor();
    }
    await page.goto(`${baseUrl()}/rigs/${r}/log`, { waitUntil: "networkidle" });
    await page.getByRole("heading", { name: "Logbook" }).waitFor();

    await context.setOffline(true);
    await expect.poll(() => page.locator("[data-sync-state]").first().textContent()).toMatch(/^.?Offline/);
    // Through the navigation, as a person would.
    await page.getByRole("link", { name: "People" }).first().click();
    await page.getByRole("heading", { name: "People on this rig" }).waitFor();
    await page.locator("[data-offline-copy]").waitFor();
    expect(await page.getByText("Something went wrong").count()).toBe(0);
    await page.getByText("sam@juniper.example").first().waitFor();

    await page.getByRole("link", { name: "Rigs" }).first().click();
    await page.getByRole("heading", { name: "Rigs", exact: true }).waitFor();
    await page.locator("[data-offline-copy]").waitFor();
    await page.getByText("Juniper").first().waitFor();

    await page.getByRole("link", { name: "Account" }).first().click();
    await page.getByRole("heading", { name: "Account", exact: true }).waitFor();
    await page.locator("[data-offline-copy]").waitFor();
    expect(await page.getByText("Something went wrong").count()).toBe(0);
    await context.setOffline(false);
    await context.close();
  });

  test("a page this phone never kept says it needs a connection instead of an error", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, "sam@juniper.example");
    const page = await context.newPage();
    // Installed (the worker holds the app's code), but the Account page was never opened here.
    await page.goto(`${baseUrl()}/rigs/${juniper.rigId}/log`, { waitUntil: "networkidle" });
    await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
    await page.reload({ waitUntil: "networkidle" });
    await expect.poll(() => page.evaluate(() => navigator.serviceWorker.controller !== null), { timeout: 10_000 }).toBe(true);
    await page.getByRole("heading", { name: "Logbook" }).waitFor();
    await context.setOffline(true);
    await page.getByRole("link", { name: "Account" }).first().click();
    await page.getByRole("heading", { name: "Needs a connection" }).waitFor();
    await context.setOffline(false);
    await context.close();
  });
});
