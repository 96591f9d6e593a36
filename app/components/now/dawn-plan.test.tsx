// The dawn-plan card shows the engine's plan and offers one tap to crew, not to guests.
import { describe, expect, test } from "vitest";
import { renderToString } from "react-dom/server";
import { juniperModel } from "../../../tests/fixtures/juniper";
import { emptyRigState } from "~/schemas/rig-state";
import { computeNow } from "./now-model";
import { DawnPlanCard, dawnPlanFor } from "./dawn-plan";

const at = Date.parse("2026-10-15T19:30:00-06:00");
const state = (socPct: number) => ({ ...emptyRigState("rig-1"), soc: { socPct, source: "entered" as const, takenAt: new Date(at).toISOString() } });
const text = (html: string) => html.replace(/<!-- -->/g, "").replace(/<[^>]+>/g, " ").replace(/\s+/g, " ");

describe("dawn plan on Now", () => {
  test("at 40 % the card names the loads to switch off and crew get the one-tap button", () => {
    const now = computeNow({ model: juniperModel, state: state(40), atMs: at });
    const plan = dawnPlanFor(juniperModel, now, 5);
    expect(plan.found).toBe(true);
    const html = renderToString(<DawnPlanCard model={juniperModel} now={now} canWrite onChange={() => {}} />);
    for (const a of plan.actions) expect(text(html)).toContain(a.name);
    if (plan.switchOff.length) expect(html).toMatch(/Switch (them|it) off/);
    const guest = renderToString(<DawnPlanCard model={juniperModel} now={now} canWrite={false} onChange={() => {}} />);
    expect(guest).not.toMatch(/Switch (them|it) off/);
  });

  test("a full bank shows no card", () => {
    const now = computeNow({ model: juniperModel, state: state(95), atMs: at });
    expect(renderToString(<DawnPlanCard model={juniperModel} now={now} canWrite onChange={() => {}} />)).toBe("");
  });
});
