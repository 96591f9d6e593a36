// Photos in Chromium at phone size: the owner uploads a picture to a part of the model on the
// rig's photos page and watches its progress bar (upload throttled through the DevTools
// protocol so the bar is there long enough to see), then its thumbnail; a guest sees the
// photos but cannot add any; the owner deletes the photo again.
import { describe, expect, test } from "vitest";
import sharp from "sharp";
import { and, eq, like } from "drizzle-orm";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";
import http from "node:http";
import { photos, readings, users } from "~/db/schema";
import { createSession } from "~/auth/session.server";
import { createS3PhotoStore } from "~/storage/photo-store.server";
import { FAKE_S3_BUCKET, FAKE_S3_CREDENTIALS } from "~/env.server";

const juniper = setUpJuniper();
const { db } = juniper;

/** About 2 MB of noise, which PNG cannot squeeze: enough bytes for a visible upload. */
async function noisyPng(): Promise<Buffer> {
  return sharp({ create: { width: 900, height: 700, channels: 3, background: "#335", noise: { type: "gaussian", mean: 128, sigma: 60 } } })
    .png()
    .toBuffer();
}

describe("Photos on a phone", () => {
  test("the demo rig's photos show as thumbnails, grouped by part", async () => {
    const context = await phoneContext(juniper.browser);
    await signIn(context, "noor@juniper.example");
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/rigs/${juniper.rigId}/photos`);
    await page.getByRole("heading", { level: 1, name: /photos/ }).waitFor();
    await page.getByRole("heading", { level: 2, name: /Fuse panel/ }).waitFor();
    await page.getByRole("heading", { level: 2, name: /House bank/ }).waitFor();
    const thumb = page.getByRole("img", { name: "Fuse panel with the lid off" });
    await thumb.waitFor();
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBeGreaterThan(0);
    const widths = await page.evaluate(() => ({ inner: window.innerWidth, scroll: document.documentElement.scrollWidth }));
    expect(widths).toEqual({ inner: 390, scroll: 390 });
    // A guest sees, and is offered no way to add or delete.
    expect(await page.getByText("Add photos").count()).toBe(0);
    await page.getByRole("button", { name: "Open photo: Fuse panel with the lid off" }).click();
    await page.getByRole("dialog").waitFor();
    expect(await page.getByRole("button", { name: "Delete photo" }).count()).toBe(0);
    await context.close();
  });

  test("the owner uploads a photo to a part, sees the progress bar and then the thumbnail, and deletes it", async () => {
    const caption = `Main disconnect ${Date.now()}`;
    const context = await phoneContext(juniper.browser);
    await signIn(context, "ada@juniper.example");
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/rigs/${juniper.rigId}/photos`);
    await page.getByRole("heading", { name: "Add photos" }).waitFor();
    await page.getByLabel("Part of the model").selectOption("sw-main");
    await page.getByText("Caption and location").first().click();
    await page.getByLabel("Caption for the next photo (optional)").first().fill(caption);

    // Slow the upload to about 400 KB/s so the bar is on screen for several seconds.
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 20, downloadThroughput: -1, uploadThroughput: 400 * 1024 });

    const picture = await noisyPng();
    await page.locator('input[type="file"]').first().setInputFiles({ name: "disconnect.png", mimeType: "image/png", buffer: picture });
    const bar = page.getByRole("progressbar", { name: "Uploading disconnect.png" });
    await bar.waitFor();
    const seen = new Set<number>();
    for (let i = 0; i < 40 && (await bar.count()) > 0; i++) {
      const value = await bar.evaluate((el: HTMLProgressElement) => el.value).catch(() => null);
      if (value !== null) seen.add(value);
      await page.waitForTimeout(100);
    }
    // The bar moved: it showed a value between empty and full along the way.
    expect([...seen].some((v) => v > 0 && v < 100)).toBe(true);

    const thumb = page.getByRole("img", { name: caption });
    await thumb.first().waitFor({ timeout: 30_000 });
    await expect.poll(() => thumb.first().evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), { timeout: 15_000 }).toBeGreaterThan(0);
    expect(await bar.count()).toBe(0);
    // The page with the add form and a new group still fits a 390-pixel phone.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBe(390);
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });

    const [row] = await db.select().from(photos).where(eq(photos.caption, caption));
    expect(row).toMatchObject({ partId: "sw-main", partKind: "switch", mime: "image/png", width: 900, height: 700 });

    // After a reload it is listed under its part; then the owner deletes it.
    await page.reload();
    await page.getByRole("heading", { level: 2, name: /Main disconnect/ }).waitFor();
    page.on("dialog", (d) => void d.accept());
    await page.getByRole("button", { name: `Open photo: ${caption}` }).click();
    await page.getByRole("dialog").getByRole("button", { name: "Delete photo" }).click();
    await page.getByRole("status").filter({ hasText: "Photo deleted." }).waitFor({ state: "attached" });
    await expect.poll(() => page.getByRole("img", { name: caption }).count()).toBe(0);
    await page.getByText("No photos yet.").waitFor();
    expect(await db.select().from(photos).where(eq(photos.caption, caption))).toEqual([]);
    await context.close();
  });

  test("crew add a photo to a logbook reading on the reading's page", async () => {
    const note = `photo-reading-${Date.now()}`;
    const context = await phoneContext(juniper.browser);
    await signIn(context, "sam@juniper.example");
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/rigs/${juniper.rigId}/log`);
    await page.getByRole("heading", { name: "Logbook" }).waitFor();
    const box = (name: string) => page.getByRole("textbox", { name, exact: true });
    await box("Bank voltage").fill("13.21");
    await box("State of charge").fill("81");
    await box("Current").fill("3.5");
    if (!(await box("Note").isVisible())) await page.getByText("Time, temperature, solar, note").click();
    await box("Note").fill(note);
    await page.getByRole("button", { name: "Save reading" }).click();
    await page.getByText("Reading saved on this phone.").waitFor();
    // The photo needs the reading on the server: wait for the sync.
    const synced = () => db.select().from(readings).where(and(eq(readings.rigId, juniper.rigId), like(readings.note, note)));
    await expect.poll(async () => (await synced()).length, { timeout: 20_000 }).toBe(1);
    const [reading] = await synced();

    await page.goto(`${baseUrl()}/rigs/${juniper.rigId}/log/${reading!.id}`);
    await page.getByRole("heading", { name: /Photos of this reading/ }).waitFor();
    await page.getByText("No photos of this reading.").waitFor();
    // Crew cannot keep a location, so only the caption is offered.
    expect(await page.getByText("Caption and location").count()).toBe(0);
    const picture = await sharp({ create: { width: 320, height: 240, channels: 3, background: "#a85d05" } }).webp().toBuffer();
    await page.locator('input[type="file"]').setInputFiles({ name: "monitor.webp", mimeType: "image/webp", buffer: picture });
    const thumb = page.getByRole("img", { name: "Photo 1" });
    await thumb.waitFor({ timeout: 20_000 });
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBeGreaterThan(0);
    const [row] = await db.select().from(photos).where(eq(photos.readingId, reading!.id));
    expect(row).toMatchObject({ mime: "image/webp", partId: null, width: 320, height: 240 });
    await context.close();
  });

  test("a phone that hangs up half-way through an upload leaves no row and no object on the real server", async () => {
    // The global set-up put the S3 fake's port in the environment.
    const store = createS3PhotoStore({
      bucket: FAKE_S3_BUCKET,
      endpoint: `http://127.0.0.1:${process.env.PHOTOS_S3_PORT}`,
      region: "us-east-1",
      credentials: { ...FAKE_S3_CREDENTIALS },
      forcePathStyle: true,
      fake: true,
    });
    const objects = async () => {
      const keys: string[] = [];
      for await (const o of store.list(`photos/${juniper.rigId}/`)) keys.push(o.key);
      return keys.sort();
    };
    const rows = async () => (await db.select({ id: photos.id }).from(photos).where(eq(photos.rigId, juniper.rigId))).length;
    const before = { rows: await rows(), objects: await objects() };
    const [ada] = await db.select().from(users).where(eq(users.email, "ada@juniper.example"));
    const { setCookie } = await createSession(db, ada!.id, "browser test: abandoned upload");
    const url = new URL(`/api/rigs/${juniper.rigId}/photos?partId=fuse-panel`, baseUrl());
    const outcome = await new Promise<string>((resolve) => {
      const req = http.request(url, {
        method: "POST",
        headers: { cookie: setCookie.split(";")[0]!, origin: url.origin, "content-type": "image/jpeg", "content-length": String(5 * 1024 * 1024) },
      });
      req.on("response", (res) => resolve(`answered ${res.statusCode}`));
      req.on("error", () => resolve("hung up"));
      req.write(Buffer.alloc(1024 * 1024, 0xff), () => setTimeout(() => req.destroy(), 200));
    });
    expect(outcome).toBe("hung up");
    await new Promise((r) => setTimeout(r, 1000));
    expect(await rows()).toBe(before.rows);
    expect(await objects()).toEqual(before.objects);
    // The server is still well.
    expect((await fetch(new URL("/api/health", baseUrl()))).status).toBe(200);
  });
});
