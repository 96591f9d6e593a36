import { describe, expect, test } from "vitest";
import { parseNumber, parseReadingForm } from "./reading-input";

const now = new Date("2025-10-12T03:00:00Z");
const ctx = { now, timeZone: "Europe/Berlin" };

describe("The add-reading form", () => {
  test("reads a decimal comma and ignores spaces", () => {
    expect(parseNumber("13,25")).toBe(13.25);
    expect(parseNumber(" 1 200 ")).toBe(1200);
    expect(parseNumber("")).toBeNull();
    expect(parseNumber("13.2V")).toBe("bad");
  });

  test("current takes its sign from the direction: discharging is negative, charging positive", () => {
    const out = parseReadingForm({ bankVoltageV: "13.1", currentA: "4.5", direction: "discharging" }, ctx);
    expect(out).toMatchObject({ ok: true, reading: { bankVoltageV: 13.1, currentA: -4.5 } });
    const inn = parseReadingForm({ currentA: "18", direction: "charging" }, ctx);
    expect(inn).toMatchObject({ ok: true, reading: { currentA: 18 } });
    // A typed sign wins over the buttons.
    expect(parseReadingForm({ currentA: "-2", direction: "charging" }, ctx)).toMatchObject({ ok: true, reading: { currentA: -2 } });
  });

  test("an empty time means now; a reading with no value at all is refused with a message", () => {
    expect(parseReadingForm({ socPct: "76" }, ctx)).toMatchObject({ ok: true, reading: { takenAt: now.toISOString(), socPct: 76 } });
    const empty = parseReadingForm({ note: "just a note" }, ctx);
    expect(empty.ok).toBe(false);
    expect(!empty.ok && empty.errors.form).toMatch(/at least one value/);
  });

  test("the typed time is the rig's local time, and a temperature typed in °F is kept in °C", () => {
    // Europe/Berlin is UTC+2 on 12 Oct 2025 (IANA tzdb); 57.2 °F is 14 °C (°C = (°F − 32) × 5/9, NIST SP 811).
    const out = parseReadingForm({ takenAt: "2025-10-12T21:40", temperatureC: "57.2", socPct: "80" }, { ...ctx, temperatureUnit: "f" });
    expect(out).toMatchObject({ ok: true, reading: { takenAt: "2025-10-12T19:40:00.000Z", temperatureC: 14 } });
    const bad = parseReadingForm({ takenAt: "2025-02-30T10:00", socPct: "80" }, ctx);
    expect(!bad.ok && bad.errors.takenAt).toMatch(/date and time/);
  });

  test("out-of-range and non-numeric values name the field and say what is allowed", () => {
    const out = parseReadingForm({ socPct: "104", bankVoltageV: "thirteen" }, ctx);
    expect(out.ok).toBe(false);
    expect(!out.ok && out.errors.bankVoltageV).toMatch(/Bank voltage: type a number/);
    const range = parseReadingForm({ socPct: "104" }, ctx);
    expect(!range.ok && range.errors.socPct).toBe("State of charge must be at most 100 %");
  });
});
