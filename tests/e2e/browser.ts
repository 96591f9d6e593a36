// Debian's Chromium through playwright-core (no browser download).
import { chromium, type Browser, type BrowserContext } from "playwright-core";

export const baseUrl = () => process.env.E2E_BASE_URL ?? "http://127.0.0.1:3199";

export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
  return {
    browser,
    // Playwright gives each launch a fresh, throw-away profile folder of its own.
    close: () => browser.close(),
  };
}

/** A phone-sized page context. */
export function phoneContext(browser: Browser): Promise<BrowserContext> {
  return browser.newContext({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true });
}
