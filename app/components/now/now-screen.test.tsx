// Engine-backed component tests: the Now screen's runway and till-dawn text match the engine.
import { describe, expect, test } from "vitest";
import { renderToString } from "react-dom/server";
import { MemoryRouter } from "react-router";
import { juniperModel } from "../../../tests/fixtures/juniper";
import { oneLoadRig } from "~/engine/test-rigs";
import { emptyRigState, type RigState } from "~/schemas/rig-state";
import type { Role } from "~/auth/roles";
import { NowScreen } from "./now-screen";
import { computeNow, loadCost } from "./now-model";
import { autonomyDaysCost, formatDays, formatDelta, formatDuration } from "./format";
import { formatDayTime } from "~/lib/datetime";

// An October evening at Juniper's home, 19:30 local (UTC−6).
const at = Date.parse("2026-10-15T19:30:00-06:00");

function stateWith(socPct: number, extra: Partial<RigState> = {}): RigState {
  return { ...emptyRigState("rig-1"), soc: { socPct, source: "entered", takenAt: new Date(at - 10 * 60_000).toISOString() }, ...extra };
}

function render(state: RigState, role: Role = "crew") {
  return renderToString(
    <MemoryRouter>
      <NowScreen
        rigId="rig-1"
        rigName="Juniper"
        model={juniperModel}
        revision={1}
        state={state}
        role={role}
        latestReading={null}
        initialNowMs={at}
        onChange={() => {}}
      />
    </MemoryRouter>,
  );
}

const text = (html: string) => html.replace(/<!-- -->/g, "").replace(/<[^>]+>/g, " ").replace(/&#x27;/g, "'").replace(/[^\S\u00a0]+/g, " ");

describe("Now screen text from the engine", () => {
  test("the runway shown is worked by hand: 1,024 Wh usable at 64 W is 16 h", () => {
    // One 64 W load on a 100 Ah, 12.8 V LiFePO4 bank, no sources: from 100 % to the 20 % floor
    // is 80 Ah × 12.8 V = 1,024 Wh, and 1,024 Wh / 64 W = 16 h (hand-worked, not from the engine).
    const model = oneLoadRig({ loadW: 64 });
    const state = { ...emptyRigState("rig-1"), soc: { socPct: 100, source: "entered" as const, takenAt: new Date(at).toISOString() } };
    const html = renderToString(
      <MemoryRouter>
        <NowScreen rigId="rig-1" rigName="Test rig" model={model} revision={1} state={state} role="crew" latestReading={null} initialNowMs={at} onChange={() => {}} />
      </MemoryRouter>,
    );
    expect(html).toContain(`data-testid="runway">16\u00a0h 00\u00a0m<`);
    expect(text(html)).toContain("to the usable floor (20 %)");
  });

  test("a bank that reaches the morning sun says it makes it, with the margin", () => {
    const now = computeNow({ model: juniperModel, state: stateWith(80), atMs: at });
    expect(now.bank.tillDawn.reaches).toBe(true);
    const t = text(render(stateWith(80)));
    // The window is named for what it is, at the engine's window time, in the rig's zone (24-hour clock by default).
    const when = formatDayTime(now.bank.tillDawn.nextWindowMs!, { timeZone: juniperModel.timeZone, clock: "24h" });
    expect(t).toContain(`Makes it till the sun is strong enough, about ${when}`);
    expect(t).not.toContain("till dawn");
    expect(t).toMatch(/At about \w{3} \d\d:\d\d, when the sun is strong enough, the bank is still with \d+ % above the floor and .+ to spare\./);
  });

  test("a nearly empty bank says it falls short, and by how long", () => {
    const now = computeNow({ model: juniperModel, state: stateWith(20), atMs: at });
    expect(now.bank.tillDawn.reaches).toBe(false);
    const t = text(render(stateWith(20)));
    const when = formatDayTime(now.bank.tillDawn.nextWindowMs!, { timeZone: juniperModel.timeZone, clock: "24h" });
    expect(t).toContain(`Falls short before the sun is strong enough, about ${when}`);
    expect(t).toContain(`The bank reaches its floor ${formatDuration(Math.abs(now.bank.tillDawn.marginH ?? 0))} before the sun is strong enough, about ${when}.`);
  });

  test("with no SoC entered, the screen asks for it and shows the runway only as a range up to the full-bank figure", () => {
    const t = text(render(emptyRigState("rig-1")));
    // The upper end is the runway from a full bank entered at this very minute.
    const full = computeNow({ model: juniperModel, state: { ...emptyRigState("rig-1"), soc: { socPct: 100, source: "entered", takenAt: new Date(at).toISOString() } }, atMs: at });
    expect(t).toContain("No SoC entered yet.");
    expect(t).toContain("How full is the bank?");
    expect(t).toContain(`0 to ${formatDuration(full.bank.runwayH, full.projection.horizonH)}`);
    expect(t).not.toContain("Makes it till");
    expect(t).not.toContain("a full bank is assumed");
  });

  test("switching a load off lengthens the runway by what the engine says it costs", () => {
    const base = computeNow({ model: juniperModel, state: stateWith(62), atMs: at });
    const cost = loadCost(juniperModel, stateWith(62), at, "sat-dish", base);
    expect(cost.deltaH).toBeLessThan(0);
    const off = computeNow({ model: juniperModel, state: stateWith(62, { switches: { "sat-dish": false } }), atMs: at });
    expect(off.bank.runwayH!).toBeGreaterThan(base.bank.runwayH!);
    // The cost (15-minute steps) agrees with the difference of the 5-minute runways within two steps.
    expect(Math.abs(-cost.deltaH! - (off.bank.runwayH! - base.bank.runwayH!))).toBeLessThan(0.5);
  });

  test("crew get a real switch per load; a guest sees no controls and is told the view is read-only", () => {
    const crew = render(stateWith(62), "crew");
    expect(crew.match(/role="switch"/g)?.length).toBe(juniperModel.loads.length);
    expect(crew).toContain("Update SoC");
    const guest = render(stateWith(62), "guest");
    expect(guest).not.toContain('role="switch"');
    expect(guest).not.toContain("Update SoC");
    expect(text(guest)).toContain("Read-only (guest)");
  });

  test("a load whose switch path is open says it is not running, and the runway counts it off", () => {
    const state = stateWith(62, { positions: { "sw-panel": "off" } });
    const now = computeNow({ model: juniperModel, state, atMs: at });
    // The fridge stays wanted on, but with the fuse panel's enable set off it has no power.
    expect(now.projection.budget.solution.loads.fridge!.powered).toBe(false);
    expect(now.projection.budget.loads.find((l) => l.loadId === "fridge")!.runWhPerDay).toBe(0);
    expect(text(render(state))).toContain("Not running: Fuse panel enable is off");
  });
});

describe("Runway formatting", () => {
  test("hours and minutes, signed changes and the horizon", () => {
    // Units hold to their numbers with a no-break space, so "h" never sits alone on a line.
    expect(formatDuration(29.42)).toBe("29\u00a0h 25\u00a0m");
    expect(formatDuration(0.5)).toBe("30\u00a0m");
    expect(formatDuration(null)).toBe("more than 72\u00a0h");
    expect(formatDelta(-1.6667)).toBe("\u22121\u00a0h 40\u00a0m");
    expect(formatDelta(0.004)).toBe("±0\u00a0m");
  });

  test("a load's cost in days of autonomy, worked by hand", () => {
    // 2,000 Wh usable, 500 Wh/day in all, the load 100 Wh/day: 2000/400 − 2000/500 = 5 − 4 = 1 day.
    expect(autonomyDaysCost(2000, 500, 100, true)).toBeCloseTo(1, 10);
    // Off, adding 100 Wh/day to 400: 2000/400 − 2000/500 = 1 day as well.
    expect(autonomyDaysCost(2000, 400, 100, false)).toBeCloseTo(1, 10);
    // Nothing else draws: without it autonomy has no end.
    expect(autonomyDaysCost(2000, 100, 100, true)).toBeNull();
    expect(formatDays(1)).toBe("1.0\u00a0days");
    expect(formatDays(0.25)).toBe("6\u00a0h 00\u00a0m");
  });
});
