/**
 * Shared set-up for browser tests on the demo rig: a Chromium, the test database and the id of
 * "Juniper". Call once at the top of a test file:
 *
 *   const juniper = setUpJuniper();
 *   // in a test: juniper.browser, juniper.rigId, juniper.db
 */
import { afterAll, beforeAll } from "vitest";
import { eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { launchBrowser } from "./browser";
import { closeAuthDb } from "./auth";
import { createDb } from "~/db/db.server";
import { rigs } from "~/db/schema";

export function setUpJuniper() {
  const { db, pool } = createDb(process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54339/tilldawn_test", 2);
  let browser: Browser | undefined;
  let close: (() => Promise<void>) | undefined;
  let rigId: string | undefined;
  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
    const [juniper] = await db.select().from(rigs).where(eq(rigs.name, "Juniper")).limit(1);
    rigId = juniper!.id;
  });
  afterAll(async () => {
    await close?.();
    await closeAuthDb();
    await pool.end();
  });
  return {
    db,
    get browser(): Browser {
      if (!browser) throw new Error("the browser starts in beforeAll");
      return browser;
    },
    get rigId(): string {
      if (!rigId) throw new Error("the rig is read in beforeAll");
      return rigId;
    },
  };
}
