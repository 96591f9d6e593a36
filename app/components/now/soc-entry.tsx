import { useId, useState } from "react";
import { restingAdvice } from "./explain";
import type { Bank } from "~/engine/model";
import { socFromRestingVoltage } from "~/engine/battery";
import { utcOffsetMinutes } from "~/engine/solar";
import { Button } from "~/components/ui/button";
import { cn } from "~/lib/cn";
import type { LatestReading, SocEntry } from "~/schemas/rig-state";
import { formatAgo, formatPct, fromLocalInput, toLocalInput } from "./format";

type Tab = "soc" | "voltage" | "logbook";
export type SocEntryTab = Tab;

const confidenceWords = { high: "high confidence", medium: "medium confidence", low: "low confidence" } as const;

/** Enter the bank's state: an SoC, a resting voltage (the engine estimates SoC), or the latest logbook reading. */
export function SocEntryForm({
  bank,
  timeZone,
  nowMs,
  latestReading,
  onSave,
  onCancel,
  initialTab = "soc",
}: {
  bank: Bank;
  timeZone: string;
  nowMs: number;
  latestReading: LatestReading | null;
  onSave: (soc: SocEntry) => void;
  onCancel: () => void;
  /** Which way of giving the SoC opens first. */
  initialTab?: SocEntryTab;
}) {
  const [tab, setTab] = useState<Tab>(initialTab);
  const [socText, setSocText] = useState("");
  const [voltText, setVoltText] = useState("");
  const [takenText, setTakenText] = useState(() => toLocalInput(nowMs, timeZone));
  const [error, setError] = useState<string | null>(null);
  const ids = { soc: useId(), volt: useId(), taken: useId(), err: useId() };

  const volt = Number(voltText.replace(",", "."));
  const estimate = voltText.trim() && Number.isFinite(volt) && volt > 0 ? socFromRestingVoltage(bank, volt) : null;

  const takenAt = (): string | null => {
    const ms = fromLocalInput(takenText, timeZone, utcOffsetMinutes);
    if (ms === null) {
      setError("Give the date and time the value was read.");
      return null;
    }
    if (ms > Date.now() + 5 * 60_000) {
      setError("The reading cannot be in the future.");
      return null;
    }
    return new Date(ms).toISOString();
  };

  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    setError(null);
    if (tab === "logbook") {
      if (!latestReading) return setError("The logbook has no reading with a SoC or a voltage yet.");
      if (latestReading.socPct !== null) {
        return onSave({ socPct: latestReading.socPct, source: "logbook", takenAt: latestReading.takenAt });
      }
      const est = socFromRestingVoltage(bank, latestReading.bankVoltageV!);
      return onSave({ socPct: est.socPct, source: "logbook", restingV: latestReading.bankVoltageV!, takenAt: latestReading.takenAt });
    }
    const at = takenAt();
    if (!at) return;
    if (tab === "soc") {
      const v = Number(socText.replace(",", ".").replace("%", "").trim());
      if (!socText.trim() || !Number.isFinite(v) || v < 0 || v > 100) return setError("Enter a state of charge between 0 and 100 %.");
      return onSave({ socPct: v, source: "entered", takenAt: at });
    }
    const nominal = bank.batteryNominalV * bank.seriesCount;
    if (!estimate || volt < nominal * 0.6 || volt > nominal * 1.4) {
      return setError(`Enter the bank's resting voltage, e.g. ${(nominal * 1.03).toFixed(2)} V for this ${nominal} V bank.`);
    }
    return onSave({ socPct: Math.round(estimate.socPct * 10) / 10, source: "resting_voltage", restingV: volt, takenAt: at });
  };

  const tabs: Array<[Tab, string]> = [
    ["soc", "SoC"],
    ["voltage", "Resting voltage"],
    ["logbook", "Logbook"],
  ];

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-describedby={error ? ids.err : undefined}>
      <div role="tablist" aria-label="How to give the state of charge" className="grid grid-cols-3 gap-1 rounded-xl bg-night-800 p-1">
        {tabs.map(([t, label]) => (
          <button
            key={t}
            type="button"
            role="tab"
            aria-selected={tab === t}
            onClick={() => {
              setTab(t);
              setError(null);
            }}
            className={cn("min-h-12 rounded-lg font-bold", tab === t ? "bg-dawn-500 text-night-950" : "text-night-200")}
          >
            {label}
          </button>
        ))}
      </div>

      {tab === "soc" ? (
        <div className="space-y-1">
          <label htmlFor={ids.soc} className="block font-bold">
            State of charge of the {bank.name.toLowerCase()} (%)
          </label>
          <input
            id={ids.soc}
            inputMode="decimal"
            autoComplete="off"
            value={socText}
            onChange={(e) => setSocText(e.target.value)}
            placeholder="e.g. 64"
            className="tabular min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-2xl"
          />
          <p className="text-sm text-night-300">From a battery monitor (shunt) or the BMS app.</p>
        </div>
      ) : null}

      {tab === "voltage" ? (
        <div className="space-y-2">
          <label htmlFor={ids.volt} className="block font-bold">
            Resting voltage of the bank (V)
          </label>
          <input
            id={ids.volt}
            inputMode="decimal"
            autoComplete="off"
            value={voltText}
            onChange={(e) => setVoltText(e.target.value)}
            placeholder="e.g. 13.20"
            className="tabular min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-2xl"
          />
          <p className="text-sm text-night-300" data-testid="resting-advice">{restingAdvice(bank.chemistry)}</p>
          {estimate ? (
            <div aria-live="polite" className={cn("rounded-xl border p-3", estimate.confidence === "low" ? "border-ember-500" : "border-night-600")}>
              <p className="tabular text-lg font-bold">
                About {formatPct(estimate.socPct)}{" "}
                <span className="text-night-200">
                  (between {formatPct(estimate.socLowPct)} and {formatPct(estimate.socHighPct)}), {confidenceWords[estimate.confidence]}
                </span>
              </p>
              {estimate.flatCurve ? (
                <p className="text-ember-300">
                  LiFePO4 rests at almost the same voltage from about 20 % to 90 %: a voltage here cannot tell the SoC. Use a battery monitor&apos;s SoC if you have one.
                </p>
              ) : null}
              {estimate.how.note ? <p className="mt-1 text-sm text-night-300">{estimate.how.note}</p> : null}
            </div>
          ) : null}
        </div>
      ) : null}

      {tab === "logbook" ? (
        latestReading ? (
          <div className="rounded-xl border border-night-600 p-3">
            <p className="font-bold">Latest logbook reading, {formatAgo(Date.parse(latestReading.takenAt), nowMs)}</p>
            <p className="tabular text-lg">
              {latestReading.socPct !== null ? `SoC ${formatPct(latestReading.socPct)}` : `${latestReading.bankVoltageV?.toFixed(2)} V (SoC estimated from it)`}
            </p>
          </div>
        ) : (
          <p className="rounded-xl border border-night-600 p-3 text-night-200">The logbook has no reading with a SoC or a voltage yet.</p>
        )
      ) : null}

      {tab !== "logbook" ? (
        <div className="space-y-1">
          <label htmlFor={ids.taken} className="block font-bold">
            Read at (rig time)
          </label>
          <input
            id={ids.taken}
            type="datetime-local"
            value={takenText}
            onChange={(e) => setTakenText(e.target.value)}
            className="tabular min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3"
          />
        </div>
      ) : null}

      {error ? (
        <p id={ids.err} role="alert" className="rounded-xl bg-night-800 p-3 font-bold text-ember-300">
          {error}
        </p>
      ) : null}
      <div className="flex gap-2">
        <Button type="submit" variant="primary" className="flex-1">
          {tab === "logbook" ? "Use this reading" : "Save"}
        </Button>
        <Button variant="outline" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
