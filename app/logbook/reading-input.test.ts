import { describe, expect, test } from "vitest";
import { parseNumber, parseReadingForm } from "./reading-input";

const now = new Date("2025-10-12T03:00:00Z");

describe("The add-reading form", () => {
  test("reads a decimal comma and ignores spaces", () => {
    expect(parseNumber("13,25")).toBe(13.25);
    expect(parseNumber(" 1 200 ")).toBe(1200);
    expect(parseNumber("")).toBeNull();
    expect(parseNumber("13.2V")).toBe("bad");
  });

  test("current takes its sign from the direction: discharging is negative, charging positive", () => {
    const out = parseReadingForm({ bankVoltageV: "13.1", currentA: "4.5", direction: "discharging" }, now);
    expect(out).toMatchObject({ ok: true, reading: { bankVoltageV: 13.1, currentA: -4.5 } });
    const inn = parseReadingForm({ currentA: "18", direction: "charging" }, now);
    expect(inn).toMatchObject({ ok: true, reading: { currentA: 18 } });
    // A typed sign wins over the buttons.
    expect(parseReadingForm({ currentA: "-2", direction: "charging" }, now)).toMatchObject({ ok: true, reading: { currentA: -2 } });
  });

  test("an empty time means now; a reading with no value at all is refused with a message", () => {
    expect(parseReadingForm({ socPct: "76" }, now)).toMatchObject({ ok: true, reading: { takenAt: now.toISOString(), socPct: 76 } });
    const empty = parseReadingForm({ note: "just a note" }, now);
    expect(empty.ok).toBe(false);
    expect(!empty.ok && empty.errors.form).toMatch(/at least one value/);
  });

  test("out-of-range and non-numeric values name the field and say what is allowed", () => {
    const out = parseReadingForm({ socPct: "104", bankVoltageV: "thirteen" }, now);
    expect(out.ok).toBe(false);
    expect(!out.ok && out.errors.bankVoltageV).toMatch(/Bank voltage: type a number/);
    const range = parseReadingForm({ socPct: "104" }, now);
    expect(!range.ok && range.errors.socPct).toBe("State of charge must be at most 100 %");
  });
});
