import { describe, expect, test } from "vitest";
import { juniperModel } from "../../tests/fixtures/juniper";
import { emptyRigState } from "~/schemas/rig-state";
import { evaluateConditions, type RecentReading } from "./conditions";
import { DEFAULT_RULES, inQuietHours, mayNotify, rulesWithDefaults, DEFAULT_PREFERENCES, type RigRules } from "./rules";
import { alertText } from "./text";

const allOn: RigRules = { ...DEFAULT_RULES, no_reading: { ...DEFAULT_RULES.no_reading, enabled: true } };
// 04:00 UTC on 14 October 2026 is 22:00 on the 13th in America/Denver (MDT, UTC−6): night at the rig's home.
const NIGHT = Date.parse("2026-10-14T04:00:00Z");
// 19:00 UTC is 13:00 MDT: the sun is high over 38.5° N.
const NOON = Date.parse("2026-10-14T19:00:00Z");

function run(nowMs: number, readings: RecentReading[], rules = allOn) {
  const { conditions } = evaluateConditions({ model: juniperModel, state: emptyRigState("r"), readings, rules, nowMs });
  return Object.fromEntries(conditions.map((c) => [c.rule, c]));
}
const reading = (nowMs: number, minutesAgo: number, v: Partial<RecentReading>): RecentReading => ({
  takenAtMs: nowMs - minutesAgo * 60_000,
  socPct: null,
  bankVoltageV: null,
  currentA: null,
  ...v,
});

describe("alert conditions", () => {
  test("a low SoC at night gives a short runway and falls short; a full bank gives neither", () => {
    const low = run(NIGHT, [reading(NIGHT, 1, { socPct: 20 })]);
    expect(low.runway_low!.active).toBe(true);
    expect(low.runway_low!.detail.runwayH).toBeGreaterThan(0);
    expect(low.runway_low!.detail.runwayH).toBeLessThan(3);
    expect(low.runway_low!.detail.cutoffAtMs).toBeGreaterThan(NIGHT);
    expect(low.falls_short!.active).toBe(true);
    const full = run(NIGHT, [reading(NIGHT, 1, { socPct: 90 })]);
    expect(full.runway_low!.active).toBe(false);
    expect(full.falls_short!.active).toBe(false);
  });

  test("the runway runs down between readings: projected from the reading's time, less the time since", () => {
    const then = NIGHT - 2 * 3_600_000;
    const atReading = run(then, [reading(then, 0, { socPct: 30 })]).runway_low!.detail.runwayH!;
    const now = run(NIGHT, [reading(NIGHT, 120, { socPct: 30 })]).runway_low!.detail.runwayH!;
    expect(now).toBeCloseTo(atReading - 2, 6);
  });

  test("SoC below the bank's usable floor (15 % for Juniper) fires; above it does not", () => {
    expect(run(NIGHT, [reading(NIGHT, 1, { socPct: 12 })]).soc_low!.active).toBe(true);
    expect(run(NIGHT, [reading(NIGHT, 1, { socPct: 40 })]).soc_low!.active).toBe(false);
    expect(run(NIGHT, [reading(NIGHT, 1, { socPct: 40 })], { ...allOn, soc_low: { enabled: true, floorPct: 50 } }).soc_low!.active).toBe(true);
  });

  test("voltage below the default 12.0 V for a 12 V bank fires only with a fresh reading", () => {
    expect(run(NIGHT, [reading(NIGHT, 5, { bankVoltageV: 11.8 })]).voltage_low!.active).toBe(true);
    expect(run(NIGHT, [reading(NIGHT, 5, { bankVoltageV: 13.2 })]).voltage_low!.active).toBe(false);
    expect(run(NIGHT, [reading(NIGHT, 180, { bankVoltageV: 11.8 })]).voltage_low!.active).toBe(false);
    expect(run(NIGHT, [reading(NIGHT, 5, { bankVoltageV: 11.8 })]).voltage_low!.detail.thresholdV).toBe(12);
  });

  test("no reading for longer than the rule's hours while parked fires; in another mode it does not", () => {
    expect(run(NIGHT, [reading(NIGHT, 7 * 60, { socPct: 80 })]).no_reading!.active).toBe(true);
    expect(run(NIGHT, [reading(NIGHT, 60, { socPct: 80 })]).no_reading!.active).toBe(false);
    const onlyStorage = { ...allOn, no_reading: { enabled: true, afterH: 6, parkedModeIds: ["storage"] } };
    expect(run(NIGHT, [reading(NIGHT, 7 * 60, { socPct: 80 })], onlyStorage).no_reading!.active).toBe(false);
  });

  test("no charge current at midday with the sun on the panels fires; the same at night does not", () => {
    expect(run(NOON, [reading(NOON, 2, { socPct: 60, currentA: -3 })]).charging_stopped!.active).toBe(true);
    expect(run(NOON, [reading(NOON, 2, { socPct: 60, currentA: 12 })]).charging_stopped!.active).toBe(false);
    expect(run(NIGHT, [reading(NIGHT, 2, { socPct: 60, currentA: -3 })]).charging_stopped!.active).toBe(false);
  });

  test("rules turned off are not evaluated", () => {
    const off = rulesWithDefaults({ runway_low: { enabled: false, belowH: 3 } });
    expect(run(NIGHT, [reading(NIGHT, 1, { socPct: 20 })], off).runway_low).toBeUndefined();
  });
});

describe("quiet hours", () => {
  // Time zone arithmetic checked against the IANA database as shipped in Node's ICU:
  // 2026-10-14T04:00Z is 22:00 in America/Denver (MDT, UTC−6).
  const prefs = { ...DEFAULT_PREFERENCES, quietStartMin: 21 * 60, quietEndMin: 7 * 60, timeZone: "America/Denver" };
  test("a window across midnight holds back other rules but never the cutoff warning", () => {
    expect(inQuietHours(prefs, NIGHT)).toBe(true);
    expect(inQuietHours(prefs, NOON)).toBe(false);
    expect(mayNotify(prefs, "soc_low", NIGHT)).toBe(false);
    expect(mayNotify(prefs, "runway_low", NIGHT)).toBe(true);
    expect(mayNotify({ ...prefs, rules: ["soc_low"] }, "runway_low", NIGHT)).toBe(false);
  });
});

describe("alert text", () => {
  test("says what is happening, when the cutoff is expected, links to Now, and takes an optional dawn-plan line", () => {
    const t = alertText(
      { rule: "runway_low", rigName: "Juniper", rigId: "abc", detail: { runwayH: 2.5, cutoffAtMs: NIGHT + 2.5 * 3_600_000 }, timeZone: "America/Denver", appUrl: "https://tilldawn.example/", dawnPlanLine: "Switch off the dish to make it to sunrise." },
      NIGHT,
    );
    expect(t.body).toContain("about 2 h 30 min left");
    // 22:00 MDT on Tuesday 13 October + 2.5 h = 00:30 on Wednesday 14 October 2026.
    expect(t.body).toContain("Wednesday 00:30");
    expect(t.body).toContain("Switch off the dish to make it to sunrise.");
    expect(t.body).toContain("https://tilldawn.example/rigs/abc");
    expect(t.clearBody).toContain("All clear on Juniper");
    const plain = alertText({ rule: "runway_low", rigName: "Juniper", rigId: "abc", detail: { runwayH: 0.5, cutoffAtMs: null }, timeZone: "UTC", appUrl: "http://x" }, NIGHT);
    expect(plain.body).toContain("about 30 min left");
    expect(plain.body).not.toContain("cutoff at");
  });
});
