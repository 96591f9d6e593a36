import { createContext, useContext, useState, type ReactNode } from "react";
import type { How } from "~/engine/explain";
import { Sheet } from "~/components/ui/sheet";
import { cn } from "~/lib/cn";
import type { Chemistry } from "~/engine/model";
import { formatDateTime, phoneTimeZone, type TimeSettings } from "~/lib/datetime";
import { formatDuration } from "./format";

const NBSP = "\u00a0";
const num = (v: number, digits = 2) => String(Math.round(v * 10 ** digits) / 10 ** digits);
const unit = (u: string) => (v: number | string | boolean) => (typeof v === "number" ? `${num(v)}${NBSP}${u}` : String(v));
const share = (v: number | string | boolean) => (typeof v === "number" ? `${num(v * 100, 1)}${NBSP}%` : String(v));

/** The engine's input names in plain words, each with how its value reads (units, times in the rig's zone). */
const plainNames: Record<string, [string, (v: number | string | boolean, time: TimeSettings) => string]> = {
  capacityWh: ["Bank capacity", unit("Wh")],
  capacityAh: ["Bank capacity", unit("Ah")],
  startSocPct: ["State of charge at the start", unit("%")],
  stopSocPct: ["Usable floor", unit("%")],
  stepMin: ["Step of the projection", unit("min")],
  horizonH: ["How far it looks ahead", unit("h")],
  chargeEfficiency: ["Charge efficiency", share],
  peukertExponent: ["Peukert exponent (no unit)", (v) => String(v)],
  weatherFactor: ["Sun compared with a clear sky", share],
  windowAt: ["Next charge begins", (v, time) => (typeof v === "string" && !Number.isNaN(Date.parse(v)) ? formatDateTime(Date.parse(v), time) : "none in view")],
  runwayH: ["Runway", (v) => (typeof v === "number" ? formatDuration(v) : String(v))],
  runW: ["Power while running", unit("W")],
  bankW: ["Power from the bank", unit("W")],
  dutyCyclePct: ["Share of the time it runs", unit("%")],
  hoursPerDay: ["Hours a day", unit("h")],
  standbyW: ["Standby power", unit("W")],
  bankNominalV: ["Bank voltage (nominal)", unit("V")],
  banks: ["Banks feeding it, by share", (v) => String(v)],
  loadWhPerDay: ["Loads, energy a day", unit("Wh")],
  standbyWhPerDay: ["Standby, energy a day", unit("Wh")],
  mode: ["Mode", (v) => String(v)],
  restingV: ["Resting voltage", unit("V")],
  cellsInSeries: ["Cells in series", (v) => String(v)],
  cellV: ["Voltage per cell", unit("V")],
  uncertaintyVPerCell: ["Reading uncertainty per cell", unit("V")],
  currentA: ["Current", unit("A")],
};

const suffixUnits: Array<[RegExp, string]> = [
  [/Wh$/, "Wh"], [/Ah$/, "Ah"], [/Pct$/, "%"], [/W$/, "W"], [/A$/, "A"], [/V$/, "V"], [/Min$/, "min"], [/H$/, "h"], [/C$/, "°C"], [/M$/, "m"],
];

/** One input of an engine explanation in plain words: "startSocPct: 60" → ["State of charge at the start", "60 %"]. */
export function plainInput(key: string, value: number | string | boolean, time: TimeSettings): [string, string] {
  const known = plainNames[key];
  if (known) return [known[0], known[1](value, time)];
  if (typeof value === "string" && /^\d{4}-\d\d-\d\dT\d\d:\d\d/.test(value) && !Number.isNaN(Date.parse(value))) {
    return [words(key.replace(/At$|Ms$/, "")), formatDateTime(Date.parse(value), time)];
  }
  for (const [re, u] of suffixUnits) {
    if (re.test(key) && key.replace(re, "").length > 0) return [words(key.replace(re, "")), typeof value === "number" ? `${num(value)}${NBSP}${u}` : String(value)];
  }
  return [words(key), typeof value === "boolean" ? (value ? "yes" : "no") : String(value)];
}

/** "someInputName" or "H_h" → "Some input name". */
function words(key: string): string {
  const w = key.replace(/_/g, " ").replace(/([a-z])([A-Z])/g, "$1 $2").toLowerCase().trim();
  return w.charAt(0).toUpperCase() + w.slice(1);
}

/** How to read a resting voltage, per chemistry. */
export function restingAdvice(chemistry: Chemistry): string {
  if (chemistry === "lifepo4") {
    return "LiFePO4 has a flat curve: between about 20 % and 90 % its resting voltage hardly moves, so voltage alone cannot give the SoC there. Use the SoC from a battery monitor (shunt) or the BMS; a resting voltage only says whether the bank is near empty or near full.";
  }
  return "Lead-acid: read the voltage after about 6 hours with no charge and no load, so the surface charge has settled; a reading taken sooner shows too high a SoC.";
}

/** "How computed" for one number: plain words first, then inputs, formula and source. */
export interface Explanation {
  title: string;
  value: string;
  plain: string;
  inputs?: Array<[string, string]>;
  how?: How;
  source?: string;
}

const ExplainContext = createContext<(e: Explanation) => void>(() => {});

export function ExplainProvider({ children, time = { timeZone: phoneTimeZone(), clock: "24h" } }: { children: ReactNode; time?: TimeSettings }) {
  const [open, setOpen] = useState<Explanation | null>(null);
  return (
    <ExplainContext.Provider value={setOpen}>
      {children}
      <Sheet open={open !== null} onClose={() => setOpen(null)} title={open ? `How: ${open.title}` : ""}>
        {open ? <ExplanationBody e={open} time={time} /> : null}
      </Sheet>
    </ExplainContext.Provider>
  );
}

function ExplanationBody({ e, time }: { e: Explanation; time: TimeSettings }) {
  const inputs = e.inputs ?? (e.how ? Object.entries(e.how.inputs).map(([k, v]) => plainInput(k, v, time)) : []);
  return (
    <div className="space-y-4">
      <p className="tabular text-3xl font-bold text-dawn-300">{e.value}</p>
      <p className="text-lg leading-relaxed">{e.plain}</p>
      {inputs.length ? (
        <div>
          <h3 className="mb-1 text-sm font-bold uppercase tracking-wider text-night-300">Inputs</h3>
          <dl className="divide-y divide-night-800 rounded-xl border border-night-700">
            {inputs.map(([k, v]) => (
              <div key={k} className="flex justify-between gap-3 px-3 py-2">
                <dt className="text-night-200">{k}</dt>
                <dd className="tabular text-right font-bold">{v}</dd>
              </div>
            ))}
          </dl>
        </div>
      ) : null}
      {e.how ? (
        <div>
          <h3 className="mb-1 text-sm font-bold uppercase tracking-wider text-night-300">Formula</h3>
          <p className="rounded-xl bg-night-800 p-3 font-mono text-sm">{e.how.formula}</p>
          {e.how.note ? <p className="mt-2 text-night-200">{e.how.note}</p> : null}
        </div>
      ) : null}
      {e.source ? <p className="text-sm text-night-300">Source: {e.source}</p> : null}
    </div>
  );
}

/** A number a person can tap to see how it was computed. */
export function Explainable({ explanation, children, className }: { explanation: Explanation | (() => Explanation); children: ReactNode; className?: string }) {
  const open = useContext(ExplainContext);
  return (
    <button
      type="button"
      onClick={() => open(typeof explanation === "function" ? explanation() : explanation)}
      className={cn("tabular cursor-help rounded-lg text-left underline decoration-night-500 decoration-dotted underline-offset-4 hover:decoration-dawn-400", className)}
      aria-haspopup="dialog"
    >
      {children}
    </button>
  );
}
