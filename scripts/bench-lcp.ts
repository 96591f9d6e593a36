/**
 * Home-page LCP of Tilldawn against the bare React Router app with the same loader
 * (scripts/bench-bare), both served on this machine in the same run.
 *
 * Conditions are Lighthouse's mobile defaults applied as DevTools throttling (not Lighthouse's
 * simulated "Lantern" model): 150 ms round trip, 1.6 Mbit/s down and 750 kbit/s up with
 * Lighthouse's 0.9 factor, 4× CPU slowdown, a 412 × 823 phone screen, a cold cache each run.
 * LCP is read from a PerformanceObserver ("largest-contentful-paint", buffered) in Chromium via
 * playwright-core. Usage: bench-lcp.ts APP_URL BARE_URL [runs]
 */
import { chromium, type Browser } from "playwright-core";

async function lcpOnce(browser: Browser, url: string): Promise<number> {
  const context = await browser.newContext({ viewport: { width: 412, height: 823 }, deviceScaleFactor: 1.75, isMobile: true, hasTouch: true, serviceWorkers: "block" });
  const page = await context.newPage();
  const cdp = await context.newCDPSession(page);
  await cdp.send("Network.enable");
  await cdp.send("Network.setCacheDisabled", { cacheDisabled: true });
  await cdp.send("Network.emulateNetworkConditions", {
    offline: false,
    latency: 150,
    downloadThroughput: ((1.6 * 1024 * 1024) / 8) * 0.9,
    uploadThroughput: ((750 * 1024) / 8) * 0.9,
  });
  await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
  if (process.env.LCP_DEBUG) {
    await page.addInitScript(() => ((window as unknown as { __lcpDebug?: boolean }).__lcpDebug = true));
    page.on("console", (m) => m.text().startsWith("LCP") && console.log(url, m.text()));
  }
  await page.goto(url, { waitUntil: "load", timeout: 60_000 });
  await page.waitForTimeout(1000);
  const lcp = await page.evaluate(
    () =>
      new Promise<number>((resolve) => {
        new PerformanceObserver((list) => {
          const entries = list.getEntries();
          const last = entries[entries.length - 1] as PerformanceEntry & { element?: Element; size?: number };
          if ((window as unknown as { __lcpDebug?: boolean }).__lcpDebug) console.log(`LCP ${last.startTime} ${last.element?.tagName} ${last.size} ${last.element?.textContent?.slice(0, 40)}`);
          resolve(last.startTime);
        }).observe({ type: "largest-contentful-paint", buffered: true });
        setTimeout(() => resolve(NaN), 3000);
      }),
  );
  await context.close();
  return lcp;
}

const median = (xs: number[]) => {
  const s = xs.filter(Number.isFinite).sort((a, b) => a - b);
  return s.length ? s[Math.floor(s.length / 2)]! : NaN;
};

export async function measureLcp(appUrl: string, bareUrl: string, runs = 5) {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  const app: number[] = [];
  const bare: number[] = [];
  try {
    await lcpOnce(browser, appUrl); // warm the servers, not the browser (each run has a fresh cache)
    await lcpOnce(browser, bareUrl);
    for (let i = 0; i < runs; i++) {
      app.push(await lcpOnce(browser, appUrl));
      bare.push(await lcpOnce(browser, bareUrl));
    }
  } finally {
    await browser.close();
  }
  return { app: median(app), bare: median(bare), appRuns: app, bareRuns: bare };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const [appUrl, bareUrl, runs] = process.argv.slice(2);
  const r = await measureLcp(appUrl!, bareUrl!, Number(runs ?? 5));
  const ms = (x: number) => `${Math.round(x)} ms`;
  console.log(`Home LCP (mobile, slow 4G, 4x CPU; DevTools throttling): ${ms(r.app)} vs bare app ${ms(r.bare)} = ${(r.app / r.bare).toFixed(2)}x (goal <= 1.20x)`);
  console.log(`  runs: app ${r.appRuns.map(ms).join(", ")}; bare ${r.bareRuns.map(ms).join(", ")}`);
}
