// CSV import in Chromium: a generic export (invented Juniper data) with millivolts and
// milliamps, one bad row; preview, import with progress, sync to PostgreSQL, and a second
// import of the same file that doubles nothing.
import { describe, expect, test } from "vitest";
import { and, eq, like } from "drizzle-orm";
import { baseUrl, phoneContext } from "./browser";
import { signIn } from "./auth";
import { setUpJuniper } from "./juniper";
import { readings } from "~/db/schema";

const juniper = setUpJuniper();
const { db } = juniper;

describe("CSV import in the logbook", () => {
  test("maps a monitor's columns, converts mV and mA, skips a bad row, syncs once, and a second import doubles nothing", async () => {
    const tag = `csv-${Date.now()}`;
    // Ten days ago (inside the phone's 90-day window, so the preview knows what it holds), at a
    // random minute so reruns on one database never collide (a CSV reading's id comes from
    // the rig and its time).
    const base = Math.floor((Date.now() - 10 * 86_400_000) / 60_000) * 60_000 - Math.floor(Math.random() * 5000) * 60_000;
    const at = (h: number) => new Date(base + h * 3_600_000).toISOString().slice(0, 16).replace("T", " ") + "Z";
    const csv = [
      "Time,Battery voltage (mV),Battery current (mA),SoC %,Note",
      `${at(0)},13310,-4200,88,${tag} a`,
      `${at(1)},13250,-3900,86,${tag} b`,
      `${at(2)},not-a-number,-3800,85,${tag} bad`,
      `${at(3)},13190,-4100,83,${tag} c`,
      `${at(4)},13420,12500,85,${tag} d`,
    ].join("\n");

    const { browser, rigId } = juniper;
    const context = await phoneContext(browser);
    await signIn(context, "sam@juniper.example");
    const page = await context.newPage();
    const importOnce = async () => {
      await page.goto(`${baseUrl()}/rigs/${rigId}/log`);
      await page.getByRole("heading", { name: "Logbook" }).waitFor();
      await page.getByRole("link", { name: "Import CSV" }).click();
      await page.getByRole("heading", { name: "Import readings from a CSV file" }).waitFor();
      await page.locator('input[type="file"]').setInputFiles({ name: "juniper-monitor.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
      await page.getByRole("button", { name: "3. Check and preview" }).click();
      return page.getByRole("status").filter({ hasText: "readings to import" }).textContent();
    };

    const first = await importOnce();
    expect(first).toContain("4 readings to import");
    expect(first).toContain("1 row with problems");
    await page.getByRole("button", { name: "Import 4 readings" }).click();
    await page.getByText("4 readings saved on this phone").waitFor();

    const stored = () => db.select().from(readings).where(and(eq(readings.rigId, rigId), like(readings.note, `${tag}%`)));
    await expect.poll(async () => (await stored()).length, { timeout: 30_000 }).toBe(4);
    const rows = (await stored()).sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
    expect(rows.map((r) => r.bankVoltageV)).toEqual([13.31, 13.25, 13.19, 13.42]);
    expect(rows.map((r) => r.currentA)).toEqual([-4.2, -3.9, -4.1, 12.5]);
    expect(rows.every((r) => r.source === "csv")).toBe(true);

    const again = await importOnce();
    expect(again).toContain("0 readings to import");
    expect(again).toContain("4 rows already in the logbook");
    expect((await stored()).length).toBe(4);
    await context.close();
  });
});
