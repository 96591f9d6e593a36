import { createContext, useContext, useState, type ReactNode } from "react";
import type { How } from "~/engine/explain";
import { Sheet } from "~/components/ui/sheet";
import { cn } from "~/lib/cn";

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

export function ExplainProvider({ children }: { children: ReactNode }) {
  const [open, setOpen] = useState<Explanation | null>(null);
  return (
    <ExplainContext.Provider value={setOpen}>
      {children}
      <Sheet open={open !== null} onClose={() => setOpen(null)} title={open ? `How: ${open.title}` : ""}>
        {open ? <ExplanationBody e={open} /> : null}
      </Sheet>
    </ExplainContext.Provider>
  );
}

function ExplanationBody({ e }: { e: Explanation }) {
  const inputs = e.inputs ?? (e.how ? Object.entries(e.how.inputs).map(([k, v]) => [k, String(v)] as [string, string]) : []);
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
