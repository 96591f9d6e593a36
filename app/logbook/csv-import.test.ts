import { describe, expect, test } from "vitest";
import Papa from "papaparse";
import { convertRows, detectTimeFormat, detectUnits, guessMapping, parseTime, readingIdFor } from "./csv-import";

const RIG = "3f1d2c4b-5a69-4e7f-8a1b-2c3d4e5f6a7b";
// The invented rig sits in Europe/Berlin: UTC+2 on 12–13 Oct 2025 (IANA tzdb).
const TZ = "Europe/Berlin";

// Invented Juniper exports in two made-up shapes.
const plain = `Timestamp,Battery Voltage (V),Current (A),SoC (%),Temperature (°C),Solar today (Wh),Comment
2025-10-12T01:00:00Z,13.28,-4.1,82,14,0,
2025-10-12T01:05:00Z,13.27,-4.3,82,14,0,fridge on
2025-10-12T01:05:00Z,13.27,-4.3,82,14,0,same time again
2025-10-12T01:10:00Z,abc,-4.0,81,14,0,
2025-10-12T01:15:00Z,13.26,-3.9,181,14,0,
not a time,13.25,-3.9,80,14,0,
`;
const milli = `time;vbat mV;ibat mA;soc;temp F;pv kWh
12.10.2025 21:00;13280;-4100;0.82;57.2;1.25
12.10.2025 21:05;13270;-4300;0.815;57.2;1.25
`;

const parse = (text: string) => Papa.parse<string[]>(text.trim(), { skipEmptyLines: true, delimiter: "" }).data;

describe("CSV import of a battery monitor's export", () => {
  test("maps columns from the header words and reads plain units as they are", async () => {
    const [headers, ...rows] = parse(plain);
    const mapping = guessMapping(headers!);
    expect(mapping).toEqual({ takenAt: 0, bankVoltageV: 1, currentA: 2, socPct: 3, temperatureC: 4, solarWhToday: 5, note: 6 });
    const units = detectUnits(headers!, rows, mapping);
    expect(units).toMatchObject({ voltage: "V", current: "A", soc: "pct", temperature: "C", solar: "Wh", time: "iso", invertCurrent: false });
    const out = await convertRows(RIG, rows, mapping, units, new Set(), TZ);
    expect(out.readings).toHaveLength(2);
    expect(out.readings[1]).toMatchObject({ bankVoltageV: 13.27, currentA: -4.3, socPct: 82, note: "fridge on", source: "csv" });
    // The same time twice in one file is a repeat, not "already in the logbook".
    expect(out.duplicates).toBe(0);
    expect(out.repeated).toBe(1);
    expect(out.errors).toEqual([
      { row: 5, message: '"abc" is not a number (Bank voltage).' },
      { row: 6, message: "State of charge must be at most 100 %" },
      { row: 7, message: 'The time "not a time" could not be read.' },
    ]);
  });

  test("detects millivolts, milliamps, SoC as a fraction, °F, kWh and day-first dates", async () => {
    const [headers, ...rows] = parse(milli);
    const mapping = guessMapping(headers!);
    expect(mapping).toMatchObject({ takenAt: 0, bankVoltageV: 1, currentA: 2, socPct: 3, temperatureC: 4, solarWhToday: 5 });
    const units = detectUnits(headers!, rows, mapping);
    expect(units).toMatchObject({ voltage: "mV", current: "mA", soc: "fraction", temperature: "F", solar: "kWh", time: "dmy" });
    const out = await convertRows(RIG, rows, mapping, units, new Set(), TZ);
    expect(out.errors).toEqual([]);
    expect(out.readings[0]).toMatchObject({ bankVoltageV: 13.28, currentA: -4.1, socPct: 82, temperatureC: 14, solarWhToday: 1250 });
    // "12.10.2025 21:00" with no zone is the rig's clock: 19:00 UTC, whatever the phone's zone.
    expect(out.readings[0]!.takenAt).toBe("2025-10-12T19:00:00.000Z");
  });

  test("a flipped sign convention and readings already in the logbook", async () => {
    const [headers, ...rows] = parse(plain);
    const mapping = guessMapping(headers!);
    const units = { ...detectUnits(headers!, rows, mapping), invertCurrent: true };
    const existing = new Set([Date.parse("2025-10-12T01:00:00Z")]);
    const out = await convertRows(RIG, rows, mapping, units, existing, TZ);
    expect(out.readings.map((r) => r.currentA)).toEqual([4.3]);
    expect(out.duplicates).toBe(1);
    expect(out.repeated).toBe(1);
  });

  test("time formats: epoch seconds and milliseconds, month-first when the day is over 12, 12-hour clock", () => {
    expect(detectTimeFormat(["1760230800", "1760231100"])).toBe("epoch-s");
    expect(detectTimeFormat(["1760230800000"])).toBe("epoch-ms");
    expect(detectTimeFormat(["10/13/2025 9:00"])).toBe("mdy");
    expect(detectTimeFormat(["13/10/2025 9:00"])).toBe("dmy");
    expect(parseTime("1760230800", "epoch-s", TZ)).toBe(1760230800000);
    expect(parseTime("10/13/2025 9:05 pm", "mdy", TZ)).toBe(Date.parse("2025-10-13T19:05:00Z"));
    expect(parseTime("2025-10-13 21:05", "iso", TZ)).toBe(Date.parse("2025-10-13T19:05:00Z"));
    expect(parseTime("2025-10-13T21:05:00Z", "iso", TZ)).toBe(Date.parse("2025-10-13T21:05:00Z"));
    expect(parseTime("31/02/2025 10:00", "dmy", TZ)).toBeNull();
  });

  test("the same row always gets the same reading id, so a second import doubles nothing", async () => {
    const a = await readingIdFor(RIG, 1760230800000);
    expect(a).toBe(await readingIdFor(RIG, 1760230800000));
    expect(a).not.toBe(await readingIdFor(RIG, 1760230800001));
    expect(a).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-8[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
  });
});
