// Engine-backed component tests: the Now screen's runway and till-dawn text match the engine.
import { describe, expect, test } from "vitest";
import { renderToString } from "react-dom/server";
import { MemoryRouter } from "react-router";
import { juniperModel } from "../../../tests/fixtures/juniper";
import { buildCircuitGraph } from "~/engine/circuit-graph";
import { runProjection } from "~/engine/projection";
import { emptyRigState, type RigState } from "~/schemas/rig-state";
import { NowScreen, type NowRole } from "./now-screen";
import { computeNow, loadCost, toEngineState } from "./now-model";
import { formatDelta, formatDuration } from "./format";

// An October evening at Juniper's home, 19:30 local (UTC−6).
const at = Date.parse("2026-10-15T19:30:00-06:00");

function stateWith(socPct: number, extra: Partial<RigState> = {}): RigState {
  return { ...emptyRigState("rig-1"), soc: { socPct, source: "entered", takenAt: new Date(at - 10 * 60_000).toISOString() }, ...extra };
}

function render(state: RigState, role: NowRole = "crew") {
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

const text = (html: string) => html.replace(/<!-- -->/g, "").replace(/<[^>]+>/g, " ").replace(/&#x27;/g, "'").replace(/\s+/g, " ");

describe("Now screen text from the engine", () => {
  test("the runway shown is the engine's runway for the same model and state", () => {
    const state = stateWith(62);
    const engine = runProjection(juniperModel, buildCircuitGraph(juniperModel, {}), toEngineState(juniperModel, state, at));
    const house = engine.banks.find((b) => b.bankId === "house")!;
    expect(house.runwayH).not.toBeNull();
    const html = render(state);
    expect(html).toContain(`data-testid="runway">${formatDuration(house.runwayH)}<`);
    expect(text(html)).toContain("to the usable floor (15 %)");
  });

  test("a bank that reaches the morning sun says it makes it, with the margin", () => {
    const now = computeNow({ model: juniperModel, state: stateWith(80), atMs: at });
    expect(now.bank.tillDawn.reaches).toBe(true);
    const t = text(render(stateWith(80)));
    expect(t).toContain("Makes it till dawn");
    expect(t).toMatch(/Reaches sunshine at \w{3} \d\d:\d\d with \d+ % above the floor and .+ to spare\./);
  });

  test("a nearly empty bank says it falls short, and by how long", () => {
    const now = computeNow({ model: juniperModel, state: stateWith(20), atMs: at });
    expect(now.bank.tillDawn.reaches).toBe(false);
    const t = text(render(stateWith(20)));
    expect(t).toContain("Falls short of the next charge");
    expect(t).toContain(`Reaches the floor ${formatDuration(Math.abs(now.bank.tillDawn.marginH ?? 0))} before sunshine`);
  });

  test("with no SoC entered, the screen says a full bank is assumed", () => {
    const t = text(render(emptyRigState("rig-1")));
    expect(t).toContain("No SoC entered yet: a full bank is assumed.");
    expect(t).toContain("100 %");
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
    expect(formatDuration(29.42)).toBe("29 h 25 m");
    expect(formatDuration(0.5)).toBe("30 m");
    expect(formatDuration(null)).toBe("more than 72 h");
    expect(formatDelta(-1.6667)).toBe("\u22121 h 40 m");
    expect(formatDelta(0.004)).toBe("±0 m");
  });
});
