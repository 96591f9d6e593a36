// Phone layout: no page may be wider than the phone. A wider page makes the browser zoom the
// whole page out, shrinking text and touch targets (and taps land on the wrong control).
import { beforeAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";
import { users } from "~/db/schema";
import { applySync } from "~/repos/sync.server";

const juniper = setUpJuniper();

beforeAll(async () => {
  // A few readings through the sync repository (so phones pull them), for rows in the logbook table.
  const { db, rigId } = juniper;
  const [sam] = await db.select().from(users).where(eq(users.email, "sam@juniper.example"));
  const start = Date.now() - 3 * 86_400_000 - Math.floor(Math.random() * 1000) * 60_000;
  const changes = [0, 1, 2].map((i) => ({
    id: crypto.randomUUID(),
    kind: "reading.add",
    rigId,
    clientTime: new Date().toISOString(),
    payload: {
      reading: { id: crypto.randomUUID(), takenAt: new Date(start + i * 3_600_000).toISOString(), bankVoltageV: 13.2, currentA: -3.5, socPct: 80 - i, note: "layout check", source: "hand" },
    },
  }));
  await applySync(db, { userId: sam!.id, role: "crew" }, { rigId, cursor: null, changes });
});

describe("Phone layout", () => {
  test("no page of a rig is wider than a 390-pixel phone", async () => {
    const { browser, rigId } = juniper;
    const context = await phoneContext(browser);
    await signIn(context, "sam@juniper.example");
    const page = await context.newPage();
    for (const path of [`/rigs/${rigId}`, `/rigs/${rigId}/log`, `/rigs/${rigId}/budget`, `/rigs/${rigId}/model`, `/rigs/${rigId}/members`, `/rigs/${rigId}/alerts`, `/rigs/${rigId}/photos`, "/rigs", "/account"]) {
      await page.goto(`${baseUrl()}${path}`, { waitUntil: "networkidle" });
      if (path.endsWith("/log")) await page.locator("[data-reading-id]:visible").first().waitFor();
      const widths = await page.evaluate(() => ({ inner: window.innerWidth, scroll: document.documentElement.scrollWidth }));
      expect({ path, ...widths }).toEqual({ path, inner: 390, scroll: 390 });
    }
    await context.close();
  });
});
