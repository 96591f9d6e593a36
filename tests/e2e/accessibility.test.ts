// axe-core on every page, in day and in red night mode: no WCAG 2.2 A/AA violation, colour
// contrast included. Each page's count is printed (AXE page mode count) for the report.
import { beforeAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import type { BrowserContext, Page } from "playwright-core";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";
import { axeViolations, nodeCount } from "./axe";
import { users } from "~/db/schema";
import { applySync } from "~/repos/sync.server";

const juniper = setUpJuniper();
let readingId = "";

beforeAll(async () => {
  const { db, rigId } = juniper;
  const [ada] = await db.select().from(users).where(eq(users.email, "ada@juniper.example"));
  readingId = crypto.randomUUID();
  const reading = { id: readingId, takenAt: new Date(Date.now() - 3_600_000).toISOString(), bankVoltageV: 13.2, currentA: -3.1, socPct: 78, temperatureC: 12, note: "axe check", source: "hand" };
  await applySync(db, { userId: ada!.id, role: "owner" }, { rigId, cursor: null, changes: [{ id: crypto.randomUUID(), kind: "reading.add", rigId, clientTime: new Date().toISOString(), payload: { reading } }] });
});

async function settle(page: Page, path: string) {
  await page.goto(`${baseUrl()}${path}`, { waitUntil: "networkidle" });
  await page.locator("h1").first().waitFor();
  // Client-rendered pages (logbook, import, edit) replace their fallback after hydration.
  await page.waitForFunction(() => !document.querySelector('[role="status"]')?.textContent?.startsWith("Opening"));
  await page.waitForTimeout(150);
}

async function night(context: BrowserContext, on: boolean) {
  await context.addCookies([{ name: "tilldawn_night", value: on ? "1" : "0", url: baseUrl() }]);
}

const pages = () => {
  const r = juniper.rigId;
  return [
    ["home", "/"],
    ["rigs", "/rigs"],
    ["account", "/account"],
    ["now", `/rigs/${r}`],
    ["logbook", `/rigs/${r}/log`],
    ["import", `/rigs/${r}/log/import`],
    ["reading", `/rigs/${r}/log/${readingId}`],
    ["budget", `/rigs/${r}/budget`],
    ["model", `/rigs/${r}/model`],
    ["people", `/rigs/${r}/members`],
    ["alerts", `/rigs/${r}/alerts`],
    ["photos", `/rigs/${r}/photos`],
    ["not-found", "/no/such/page"],
  ] as const;
};

describe("Accessibility (axe-core) on every page, day and night", () => {
  for (const mode of ["day", "night"] as const) {
    test(`signed-in pages in ${mode} mode have no violations`, async () => {
      const context = await phoneContext(juniper.browser);
      await signIn(context, "ada@juniper.example");
      await night(context, mode === "night");
      const page = await context.newPage();
      const found: Record<string, string[]> = {};
      for (const [name, path] of pages()) {
        await settle(page, path);
        const vs = await axeViolations(page);
        console.log(`AXE ${name} ${mode} ${nodeCount(vs)}`);
        if (vs.length) found[name] = vs.map((v) => `${v.id} ×${v.nodes.length}: ${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join(", ")}`);
      }
      expect(found).toEqual({});
      await context.close();
    });

    test(`the sign-in page in ${mode} mode has no violations`, async () => {
      const context = await phoneContext(juniper.browser);
      await night(context, mode === "night");
      const page = await context.newPage();
      await settle(page, "/sign-in");
      const vs = await axeViolations(page);
      console.log(`AXE sign-in ${mode} ${nodeCount(vs)}`);
      expect(vs.map((v) => `${v.id} ×${v.nodes.length}: ${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join(", ")}`)).toEqual([]);
      await context.close();
    });
  }
});
