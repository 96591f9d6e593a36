// Toggle latency of the Now screen: a phone-sized Chromium with 4x CPU throttling (Chrome
// DevTools Protocol) switches a load on and off and reads the Performance marks the screen sets:
// "now:toggle" (the switch handler) → "now:runway" (new runway in the DOM) and "now:chart"
// (chart redrawn). Target: under 50 ms. A benchmark, not a test.
//
//   npx tsx scripts/bench-now.ts [BASE_URL]     (default $E2E_BASE_URL or http://127.0.0.1:3000)
//
// Needs the built app served against DATABASE_URL with the demo rig seeded; it signs in as the
// demo crew member by writing a session row.
import { eq } from "drizzle-orm";
import { chromium } from "playwright-core";
import { createDb } from "../app/db/db.server";
import { rigs, users } from "../app/db/schema";
import { createSession, SESSION_COOKIE } from "../app/auth/session.server";
import { demoPeople } from "../tests/fixtures/demo";
import { pageWeight } from "./page-weight";

const base = process.argv[2] ?? process.env.E2E_BASE_URL ?? "http://127.0.0.1:3000";
const rounds = Number(process.env.BENCH_ROUNDS ?? 20);
const { db, pool } = createDb(process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54329/tilldawn", 2);
const crew = demoPeople.find((p) => p.role === "crew")!;
const [user] = await db.select().from(users).where(eq(users.email, crew.email));
const [rig] = await db.select().from(rigs).limit(1);
if (!user || !rig) throw new Error("Seed the demo rig first (npm run db:seed).");
const { setCookie } = await createSession(db, user.id, "bench-now");

const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
  args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
});
try {
  const context = await browser.newContext({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true });
  await context.addCookies([{ name: SESSION_COOKIE, value: setCookie.split(";")[0]!.slice(SESSION_COOKIE.length + 1), url: base }]);
  const page = await context.newPage();
  await page.goto(`${base}/rigs/${rig.id}`);
  await page.locator("[data-testid=projection-chart] canvas").waitFor();
  const cdp = await context.newCDPSession(page);
  await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
  const toggle = page.getByRole("switch", { name: "LED lights" });
  const runway: number[] = [];
  const chart: number[] = [];
  for (let i = 0; i < rounds + 2; i++) {
    await page.evaluate(() => performance.clearMarks());
    await toggle.click();
    // A string, so the bundler's helpers do not leak into the page.
    const m = await page.waitForFunction(`(() => {
      const get = (n) => performance.getEntriesByName(n, "mark")[0]?.startTime;
      const t = get("now:toggle"), r = get("now:runway"), c = get("now:chart");
      return t !== undefined && r !== undefined && c !== undefined ? { runway: r - t, chart: c - t } : null;
    })()`);
    const v = (await m.jsonValue()) as { runway: number; chart: number };
    if (i >= 2) {
      runway.push(v.runway);
      chart.push(v.chart);
    }
    await page.waitForTimeout(400); // let the background runway costs and the save finish
  }
  const stats = (xs: number[]) => {
    const s = [...xs].sort((a, b) => a - b);
    const q = (p: number) => s[Math.min(s.length - 1, Math.floor(p * s.length))]!;
    return `median ${q(0.5).toFixed(1)} ms, p90 ${q(0.9).toFixed(1)} ms, max ${s[s.length - 1]!.toFixed(1)} ms`;
  };
  console.log(`Now toggle → runway (4x CPU throttle, ${rounds} toggles): ${stats(runway)}`);
  console.log(`Now toggle → chart  (4x CPU throttle, ${rounds} toggles): ${stats(chart)}`);
  const worst = Math.max(...chart, ...runway);
  const weight = await pageWeight(`${base}/rigs/${rig.id}`, { cookie: setCookie.split(";")[0]! });
  console.log(`Now route JavaScript at first load: ${weight.gzipKB} KB gzip in ${weight.files.length} files (target < 200 KB; the chart module loads after).`);
  if (process.env.BENCH_BARE_URL && process.env.BENCH_BARE_CLIENT) {
    const bare = await pageWeight(process.env.BENCH_BARE_URL, {}, process.env.BENCH_BARE_CLIENT);
    console.log(`  bare React Router app, same run: ${bare.gzipKB} KB gzip; ratio ${(weight.gzipKB / bare.gzipKB).toFixed(2)}x (goal <= 1.50x)`);
  }
  console.log(worst < 50 ? "Under the 50 ms target." : `Over the 50 ms target (worst ${worst.toFixed(1)} ms).`);
} finally {
  await browser.close();
  await pool.end();
}
