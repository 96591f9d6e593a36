/**
 * The words of an alert: a title, a body in plain words with the expected cutoff time, and a
 * link to the rig's Now screen; and the "all clear" when the episode ends.
 *
 * `dawnPlanLine` is optional: the engine's dawn plan (which loads to switch off to make it to
 * the next charge), one sentence, added to the cutoff and falls-short warnings when given.
 */
import type { ConditionDetail } from "./conditions";
import { RULE_NAMES, type RuleKind } from "./rules";

export type AlertText = { title: string; body: string; clearTitle: string; clearBody: string; url: string };

export type AlertTextInput = {
  rule: RuleKind;
  rigName: string;
  rigId: string;
  detail: ConditionDetail;
  timeZone: string;
  appUrl: string;
  /** One sentence from the engine's dawn plan, e.g. "Switch off the dish and the hob to make it to sunrise with 1 h to spare." */
  dawnPlanLine?: string | null;
};

function clock(ms: number, timeZone: string, nowMs?: number): string {
  const time = new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(new Date(ms));
  if (nowMs !== undefined) {
    const day = (t: number) => new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).format(new Date(t));
    if (day(ms) !== day(nowMs)) {
      const weekday = new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "long" }).format(new Date(ms));
      return `${weekday} ${time}`;
    }
  }
  return time;
}

export function hoursWords(h: number): string {
  if (h < 1) return `${Math.max(1, Math.round(h * 60))} min`;
  const whole = Math.floor(h);
  const min = Math.round((h - whole) * 60);
  return min === 0 || min === 60 ? `${min === 60 ? whole + 1 : whole} h` : `${whole} h ${min} min`;
}

const chargeWords: Record<string, string> = { sun: "the sun", drive: "the drive", shore: "shore power", generator: "the generator", charger: "the charger" };

export function alertText(input: AlertTextInput, nowMs: number): AlertText {
  const { rule, rigName, detail: d, timeZone } = input;
  const url = `${input.appUrl.replace(/\/$/, "")}/rigs/${input.rigId}`;
  const cutoff = d.cutoffAtMs ? ` The bank is expected to reach its cutoff at about ${clock(d.cutoffAtMs, timeZone, nowMs)} (${timeZone}).` : "";
  const plan = input.dawnPlanLine ? ` ${input.dawnPlanLine.trim()}` : "";
  let body: string;
  switch (rule) {
    case "runway_low":
      body = `${rigName}'s battery bank has about ${hoursWords(d.runwayH ?? 0)} left at the loads switched on now.${cutoff}${plan}`;
      break;
    case "soc_low":
      body = `${rigName}'s battery bank is at ${Math.round(d.socPct ?? 0)} %, below its floor of ${Math.round(d.floorPct ?? 0)} %.${cutoff}`;
      break;
    case "voltage_low":
      body = `${rigName}'s battery bank reads ${(d.voltageV ?? 0).toFixed(2)} V, below the ${(d.thresholdV ?? 0).toFixed(1)} V set for this alert.${cutoff}`;
      break;
    case "no_reading":
      body = d.lastReadingAtMs
        ? `No reading has come from ${rigName} since ${clock(d.lastReadingAtMs, timeZone, nowMs)} (${timeZone}), more than ${hoursWords(d.thresholdH ?? 0)} ago. The device aboard may be off or out of signal.`
        : `No reading has come from ${rigName} for more than ${hoursWords(d.thresholdH ?? 0)}.`;
      break;
    case "charging_stopped":
      body = `${rigName} should be charging from the sun now (about ${(d.expectedNetA ?? 0).toFixed(1)} A expected), but the latest reading shows ${(d.measuredA ?? 0).toFixed(1)} A. Check the solar breaker and the charge controller.${cutoff}`;
      break;
    case "falls_short": {
      const next = d.nextChargeAtMs ? ` before ${chargeWords[d.nextChargeKind ?? ""] ?? "the next charge"} at about ${clock(d.nextChargeAtMs, timeZone, nowMs)}` : " before the next charge";
      body = `At the loads switched on now, ${rigName}'s bank will run out${next}.${cutoff}${plan}`;
      break;
    }
  }
  const title = `${rigName}: ${RULE_NAMES[rule].toLowerCase()}`;
  return {
    title,
    body: `${body} Open Now: ${url}`,
    clearTitle: `${rigName}: all clear`,
    clearBody: `All clear on ${rigName}: ${RULE_NAMES[rule].toLowerCase()} no longer applies. Open Now: ${url}`,
    url,
  };
}
