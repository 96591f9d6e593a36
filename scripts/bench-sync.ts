// Offline-first benchmarks against the real database and the built app (run `npm run build`
// first; DATABASE_URL names a migrated and seeded database):
//   1. server ingest: readings per second through POST /api/sync's repository, in batches of
//      1,000, and the server process's memory while ingesting;
//   2. a phone with 10,000 waiting readings syncs them all (Chromium, the app's own runner);
//   3. IndexedDB size of a year of 5-minute readings;
//   4. cold start of the installed app with no network, 4× CPU throttling, phone-sized:
//      time until the Now screen shows numbers.
// Usage: DATABASE_URL=… node --expose-gc --import tsx scripts/bench-sync.ts
import { spawn, type ChildProcess } from "node:child_process";
import { eq, sql } from "drizzle-orm";
import { chromium, type Page } from "playwright-core";
import { createDb } from "../app/db/db.server";
import { readings, rigs, users } from "../app/db/schema";
import { createSession, SESSION_COOKIE } from "../app/auth/session.server";
import { createRig } from "../app/repos/rigs.server";
import { applySync } from "../app/repos/sync.server";
import { juniperModel } from "../tests/fixtures/juniper";

const url = process.env.DATABASE_URL ?? "postgres://tilldawn@127.0.0.1:54329/tilldawn";
const port = Number(process.env.BENCH_PORT ?? 3295);
const origin = `http://127.0.0.1:${port}`;
const { db, pool } = createDb(url, 4);
const results: Record<string, string> = {};

function reading(i: number, start: number) {
  return {
    id: crypto.randomUUID(),
    takenAt: new Date(start + i * 300_000).toISOString(),
    bankVoltageV: 13.2 - (i % 288) * 0.001,
    currentA: -3.8,
    socPct: 90 - (i % 288) * 0.1,
    temperatureC: 12,
    solarWhToday: 0,
    note: "",
    source: "device" as const,
  };
}

async function benchIngest() {
  const tag = crypto.randomUUID().slice(0, 8);
  const [owner] = await db.insert(users).values({ email: `bench-${tag}@juniper.example`, name: "Bench" }).returning();
  const { rig } = await createRig(db, { name: `Juniper bench ${tag}`, ownerId: owner!.id, document: juniperModel });
  const total = 50_000;
  const start = Date.UTC(2024, 9, 1);
  const heap: number[] = [];
  const t0 = performance.now();
  for (let i = 0; i < total; i += 1000) {
    // Each batch is built, sent and dropped, as the server handles one request at a time.
    const changes = Array.from({ length: 1000 }, (_, k) => ({
      id: crypto.randomUUID(),
      kind: "reading.add",
      rigId: rig.id,
      clientTime: new Date().toISOString(),
      payload: { reading: reading(i + k, start) },
    }));
    await applySync(db, { userId: owner!.id, role: "owner" }, { rigId: rig.id, cursor: null, changes });
    if (i % 10_000 === 0) {
      (globalThis as { gc?: () => void }).gc?.();
      heap.push(process.memoryUsage().heapUsed);
    }
  }
  const s = (performance.now() - t0) / 1000;
  const [n] = await db.select({ n: sql<number>`count(*)::int` }).from(readings).where(eq(readings.rigId, rig.id));
  results["server ingest"] = `${Math.round(total / s).toLocaleString("en")} readings/s (${total.toLocaleString("en")} in ${s.toFixed(1)} s, batches of 1,000; stored ${n!.n.toLocaleString("en")})`;
  results["bench process heap while ingesting"] = heap.map((h) => `${(h / 1048576).toFixed(0)} MB`).join(" → ");
  await db.delete(rigs).where(eq(rigs.id, rig.id));
}

async function startServer(): Promise<ChildProcess> {
  const child = spawn(process.execPath, ["scripts/serve.mjs", "./build/server/index.js"], {
    env: { ...process.env, NODE_ENV: "production", PORT: String(port), APP_URL: origin, DATABASE_URL: url },
    stdio: ["ignore", "ignore", "inherit"],
  });
  for (let i = 0; i < 300; i++) {
    try {
      await fetch(`${origin}/api/health`);
      return child;
    } catch {
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  throw new Error("server did not start");
}

const rssOf = async (pid: number) => {
  const { readFile } = await import("node:fs/promises");
  const status = await readFile(`/proc/${pid}/status`, "utf8");
  return Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? 0) / 1024;
};

async function benchBrowser() {
  const tag = crypto.randomUUID().slice(0, 8);
  const [owner] = await db.insert(users).values({ email: `bench-phone-${tag}@juniper.example`, name: "Ada" }).returning();
  const { rig } = await createRig(db, { name: `Juniper phone ${tag}`, ownerId: owner!.id, document: juniperModel });
  const server = await startServer();
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  try {
    const context = await browser.newContext({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true });
    const { setCookie } = await createSession(db, owner!.id, "bench");
    await context.addCookies([{ name: SESSION_COOKIE, value: setCookie.split(";")[0]!.slice(SESSION_COOKIE.length + 1), url: origin, httpOnly: true, sameSite: "Lax" }]);
    const page = await context.newPage();
    await page.goto(`${origin}/rigs/${rig.id}/log`);
    await page.getByRole("heading", { name: "Logbook" }).waitFor();
    await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
    await page.goto(`${origin}/rigs/${rig.id}`);
    await page.getByTestId("runway").waitFor();
    await page.waitForTimeout(1500);

    // 2. 10,000 waiting readings, written straight into the app's outbox, then synced.
    await context.setOffline(true);
    await putWaiting(page, rig.id, owner!.id, 10_000);
    const rssBefore = await rssOf(server.pid!);
    await context.setOffline(false);
    const t0 = Date.now();
    let rssMax = rssBefore;
    for (;;) {
      const left = await outboxCount(page);
      rssMax = Math.max(rssMax, await rssOf(server.pid!));
      if (left === 0) break;
      if (Date.now() - t0 > 120_000) throw new Error(`still ${left} waiting after 120 s`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const syncS = (Date.now() - t0) / 1000;
    const [n] = await db.select({ n: sql<number>`count(*)::int` }).from(readings).where(eq(readings.rigId, rig.id));
    results["phone syncs 10,000 waiting readings"] = `${syncS.toFixed(1)} s (server has ${n!.n.toLocaleString("en")}; server RSS ${rssBefore.toFixed(0)} → max ${rssMax.toFixed(0)} MB)`;

    // 3. A year of 5-minute readings in IndexedDB, with the phone's window set to 400 days:
    // written as synced records, then packed by the app's own sync run (older days → one record per day).
    await context.setOffline(true);
    const before = await idbUsage(page);
    await putReadings(page, rig.id, owner!.id, 105_120);
    const unpacked = await idbUsage(page);
    await context.setOffline(false);
    await page.evaluate(() => window.dispatchEvent(new Event("online")));
    for (let i = 0; i < 600 && (await storeCount(page, "readings")) > 1000; i++) await new Promise((r) => setTimeout(r, 200));
    const packedDays = await storeCount(page, "readingDays");
    await new Promise((r) => setTimeout(r, 2000));
    const after = await idbUsage(page);
    const payload = await packedPayload(page);
    results["IndexedDB, a year of 5-minute readings (105,120)"] =
      `${((after - before) / 1048576).toFixed(1)} MB by the browser's estimate after packing (packed payload ${(payload / 1048576).toFixed(1)} MB in ${packedDays} day records, ${await storeCount(page, "readings")} recent records); ${((unpacked - before) / 1048576).toFixed(1)} MB as one record per reading`;
    await clearReadings(page);

    // 4. Cold start, installed, no network, 4× CPU throttling.
    const times: number[] = [];
    const dcl: number[] = [];
    for (let i = 0; i < 3; i++) {
      const cold = await context.newPage();
      const cdp = await context.newCDPSession(cold);
      await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
      // Time from the start of the navigation (the page's own clock) to a runway with digits on screen.
      await cold.goto(`${origin}/rigs/${rig.id}`, { waitUntil: "commit" });
      const shown = await cold.waitForFunction(
        () => (/\d/.test(document.querySelector("[data-testid=runway]")?.textContent ?? "") ? performance.now() : false),
        undefined,
        { timeout: 20_000, polling: "raf" },
      );
      times.push(Math.round((await shown.jsonValue()) as number));
      await cold.waitForLoadState("load");
      dcl.push(await cold.evaluate(() => Math.round((performance.getEntriesByType("navigation")[0] as PerformanceNavigationTiming).domContentLoadedEventEnd)));
      await cold.close();
    }
    results["cold start offline, 4× CPU, Now with numbers"] = `${times.map((t) => `${t} ms`).join(", ")} (median ${[...times].sort((a, b) => a - b)[1]} ms; DOMContentLoaded at ${dcl.join(", ")} ms)`;
    await context.close();
  } finally {
    await browser.close();
    server.kill("SIGTERM");
    await db.delete(rigs).where(eq(rigs.id, rig.id));
  }
}

async function putWaiting(page: Page, rigId: string, authorId: string, count: number) {
  await page.evaluate(
    async ({ rigId, authorId, count }) => {
      const open = indexedDB.open("tilldawn");
      const idb: IDBDatabase = await new Promise((res, rej) => ((open.onsuccess = () => res(open.result)), (open.onerror = () => rej(open.error))));
      const tx = idb.transaction(["readings", "outbox"], "readwrite");
      const start = Date.now() - count * 300_000;
      for (let i = 0; i < count; i++) {
        const id = crypto.randomUUID();
        const takenAt = start + i * 300_000;
        const r = { id, takenAt: new Date(takenAt).toISOString(), bankVoltageV: 13.1, currentA: -3.2, socPct: 70, temperatureC: 11, solarWhToday: 0, note: "", source: "device" };
        tx.objectStore("readings").put({ ...r, rigId, authorId, takenAt, updatedAt: Date.now(), sync: "pending" });
        tx.objectStore("outbox").add({ id: crypto.randomUUID(), rigId, kind: "reading.add", clientTime: new Date().toISOString(), payload: { reading: r }, entityId: id, state: "waiting", attempts: 0 });
      }
      await new Promise((res, rej) => ((tx.oncomplete = res), (tx.onerror = () => rej(tx.error))));
      idb.close();
    },
    { rigId, authorId, count },
  );
}

async function putReadings(page: Page, rigId: string, authorId: string, count: number) {
  await page.evaluate(
    async ({ rigId, authorId, count }) => {
      const open = indexedDB.open("tilldawn");
      const idb: IDBDatabase = await new Promise((res) => (open.onsuccess = () => res(open.result)));
      const start = Date.now() - count * 300_000;
      const meta = idb.transaction(["meta"], "readwrite");
      meta.objectStore("meta").put({ key: "windowDays", value: 400 });
      await new Promise((res) => (meta.oncomplete = res));
      for (let b = 0; b < count; b += 10_000) {
        const tx = idb.transaction(["readings"], "readwrite");
        for (let i = b; i < Math.min(count, b + 10_000); i++) {
          tx.objectStore("readings").put({
            id: crypto.randomUUID(), rigId, authorId, takenAt: start + i * 300_000,
            bankVoltageV: Math.round((12.8 + Math.random()) * 100) / 100, currentA: Math.round((Math.random() * 20 - 10) * 10) / 10,
            socPct: Math.round(Math.random() * 100), temperatureC: 15, solarWhToday: Math.round(Math.random() * 2000),
            note: "", source: "device", updatedAt: Date.now(), sync: "synced",
          });
        }
        await new Promise((res) => (tx.oncomplete = res));
      }
      idb.close();
    },
    { rigId, authorId, count },
  );
}

async function clearReadings(page: Page) {
  await page.evaluate(async () => {
    const open = indexedDB.open("tilldawn");
    const idb: IDBDatabase = await new Promise((res) => (open.onsuccess = () => res(open.result)));
    const tx = idb.transaction(["readings", "readingDays"], "readwrite");
    tx.objectStore("readings").clear();
    tx.objectStore("readingDays").clear();
    await new Promise((res) => (tx.oncomplete = res));
    idb.close();
  });
}

const outboxCount = (page: Page) => storeCount(page, "outbox");

/** Bytes of the packed day records' contents (strings counted one byte a character). */
function packedPayload(page: Page): Promise<number> {
  return page.evaluate(async () => {
    const open = indexedDB.open("tilldawn");
    const idb: IDBDatabase = await new Promise((res) => (open.onsuccess = () => res(open.result)));
    const req = idb.transaction("readingDays").objectStore("readingDays").getAll();
    const all: Array<Record<string, unknown>> = await new Promise((res) => (req.onsuccess = () => res(req.result)));
    idb.close();
    let n = 0;
    for (const d of all) {
      for (const v of Object.values(d)) {
        if (typeof v === "string") n += v.length;
        else if (ArrayBuffer.isView(v)) n += v.byteLength;
        else if (Array.isArray(v)) for (const x of v) n += typeof x === "string" ? x.length + 1 : 8;
        else n += 8;
      }
    }
    return n;
  });
}

function storeCount(page: Page, store: string): Promise<number> {
  return page.evaluate(async (store) => {
    const open = indexedDB.open("tilldawn");
    const idb: IDBDatabase = await new Promise((res) => (open.onsuccess = () => res(open.result)));
    const req = idb.transaction(store).objectStore(store).count();
    const n: number = await new Promise((res) => (req.onsuccess = () => res(req.result)));
    idb.close();
    return n;
  }, store);
}

function idbUsage(page: Page): Promise<number> {
  return page.evaluate(async () => {
    const e = (await navigator.storage.estimate()) as StorageEstimate & { usageDetails?: { indexedDB?: number } };
    return e.usageDetails?.indexedDB ?? e.usage ?? 0;
  });
}

try {
  await benchIngest();
  await benchBrowser();
} finally {
  await pool.end();
}
for (const [name, value] of Object.entries(results)) console.log(`${name.padEnd(52)} ${value}`);
