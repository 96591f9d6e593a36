import { describe, expect, test } from "vitest";
import { dayKey, formatDate, formatDayMonth, formatDateTime, formatTime, fromLocal, fromLocalInput, toLocalInput } from "./datetime";

// Offsets from the IANA time zone database (tzdb 2025): Europe/Berlin is UTC+2 in summer time
// until 26 Oct 2025 01:00 UTC, then UTC+1; America/Denver is UTC−6 in summer time, UTC−7 after
// 2 Nov 2025 08:00 UTC; Pacific/Auckland is UTC+13 from 28 Sep 2025.
const at = Date.parse("2025-10-14T18:22:00Z");

describe("Dates and times in the rig's time zone", () => {
  test("the same instant reads as the rig's local time, not the phone's", () => {
    expect(formatTime(at, { timeZone: "Europe/Berlin", clock: "24h" })).toBe("20:22");
    expect(formatTime(at, { timeZone: "America/Denver", clock: "24h" })).toBe("12:22");
    expect(formatTime(at, { timeZone: "Pacific/Auckland", clock: "24h" })).toBe("07:22");
  });

  test("a person on a 12-hour clock reads 8:22 PM, and the date style is one for everybody", () => {
    expect(formatTime(at, { timeZone: "Europe/Berlin", clock: "12h" })).toBe("8:22\u202fPM");
    expect(formatDate(at, { timeZone: "Pacific/Auckland", clock: "24h" })).toBe("Wed, 15 Oct 2025");
    expect(formatDateTime(at, { timeZone: "Europe/Berlin", clock: "24h" })).toBe("Tue, 14 Oct 2025, 20:22");
    expect(formatDayMonth(at, { timeZone: "Pacific/Auckland", clock: "24h" })).toBe("15 Oct");
  });

  test("a typed local time is read in the rig's zone on both sides of a summer-time change", () => {
    expect(fromLocalInput("2025-10-14T20:22", "Europe/Berlin")).toBe(at);
    expect(fromLocalInput("2025-10-27T20:22", "Europe/Berlin")).toBe(Date.parse("2025-10-27T19:22:00Z"));
    expect(fromLocalInput("2025-11-03T06:00", "America/Denver")).toBe(Date.parse("2025-11-03T13:00:00Z"));
    expect(toLocalInput(Date.parse("2025-10-27T19:22:00Z"), "Europe/Berlin")).toBe("2025-10-27T20:22");
    expect(fromLocal("13/10/2025 21:05", "Europe/Berlin", "dd/MM/yyyy HH:mm")).toBe(Date.parse("2025-10-13T19:05:00Z"));
  });

  test("a time that is not a real date is refused, and the calendar day is the zone's", () => {
    expect(fromLocalInput("2025-02-31T10:00", "Europe/Berlin")).toBeNull();
    expect(fromLocalInput("", "Europe/Berlin")).toBeNull();
    expect(dayKey(at, "Pacific/Auckland")).toBe("2025-10-15");
    expect(dayKey(at, "America/Denver")).toBe("2025-10-14");
  });
});
