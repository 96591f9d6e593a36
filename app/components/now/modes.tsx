import { useId, useState } from "react";
import type { RigModel } from "~/engine/model";
import { Button } from "~/components/ui/button";
import { Sheet } from "~/components/ui/sheet";
import { cn } from "~/lib/cn";
import type { StateChange } from "~/schemas/rig-state";

export type ModeEditBody =
  | { op: "create"; expectedRevision: number; name: string; loads: Array<{ loadId: string; hoursPerDay: number }>; inverterIdsOn: string[] }
  | { op: "hours"; expectedRevision: number; modeId: string; loads: Array<{ loadId: string; hoursPerDay: number }> };

/** Pick a mode (sets every switch at once); owners also save and edit modes. */
export function ModesBar({
  model,
  modeId,
  canWrite,
  isOwner,
  loadsOn,
  inverterIdsOn,
  revision,
  onChange,
  onModeEdit,
}: {
  model: RigModel;
  modeId: string;
  canWrite: boolean;
  isOwner: boolean;
  loadsOn: string[];
  inverterIdsOn: string[];
  revision: number;
  onChange: (c: StateChange) => void;
  onModeEdit?: (body: ModeEditBody) => Promise<unknown>;
}) {
  const [sheet, setSheet] = useState<"save" | "hours" | null>(null);
  const mode = model.modes.find((m) => m.id === modeId) ?? model.modes[0]!;
  return (
    <section aria-labelledby="modes-heading" className="space-y-2">
      <h2 id="modes-heading" className="text-xl font-bold">
        Mode
      </h2>
      <div className="flex flex-wrap gap-2" role="group" aria-label="Modes">
        {model.modes.map((m) => (
          <button
            key={m.id}
            type="button"
            aria-pressed={m.id === mode.id}
            disabled={!canWrite}
            onClick={() => onChange({ kind: "mode", modeId: m.id })}
            className={cn(
              "min-h-12 rounded-xl border px-4 font-bold disabled:cursor-default",
              m.id === mode.id ? "border-dawn-400 bg-dawn-500 text-night-950" : "border-night-600 bg-night-900 text-night-100 enabled:hover:border-dawn-500",
            )}
          >
            {m.name}
          </button>
        ))}
      </div>
      {isOwner && onModeEdit ? (
        <div className="flex flex-wrap gap-2">
          <Button variant="outline" onClick={() => setSheet("save")}>
            Save switches as a mode
          </Button>
          <Button variant="outline" onClick={() => setSheet("hours")}>
            Hours in “{mode.name}”
          </Button>
        </div>
      ) : null}
      {isOwner && onModeEdit ? (
        <>
          <Sheet open={sheet === "save"} onClose={() => setSheet(null)} title="Save as a new mode">
            <SaveModeForm
              model={model}
              mode={mode}
              loadsOn={loadsOn}
              onDone={() => setSheet(null)}
              onSubmit={(name) =>
                onModeEdit({
                  op: "create",
                  expectedRevision: revision,
                  name,
                  inverterIdsOn,
                  loads: loadsOn.map((loadId) => ({ loadId, hoursPerDay: mode.loads.find((l) => l.loadId === loadId)?.hoursPerDay ?? 24 })),
                })
              }
            />
          </Sheet>
          <Sheet open={sheet === "hours"} onClose={() => setSheet(null)} title={`Hours per day in “${mode.name}”`}>
            <HoursForm
              model={model}
              mode={mode}
              onDone={() => setSheet(null)}
              onSubmit={(loads) => onModeEdit({ op: "hours", expectedRevision: revision, modeId: mode.id, loads })}
            />
          </Sheet>
        </>
      ) : null}
    </section>
  );
}

function errorText(e: unknown): string {
  return e instanceof Error ? e.message : "The change could not be saved.";
}

/** A form's save: busy while it runs, then done, or its error shown with nothing lost. */
function useSaving() {
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function save(run: () => Promise<unknown>, onDone: () => void) {
    setBusy(true);
    try {
      await run();
      onDone();
    } catch (err) {
      setError(errorText(err));
    } finally {
      setBusy(false);
    }
  }
  return { error, setError, busy, save };
}

function SaveModeForm({ model, mode, loadsOn, onSubmit, onDone }: { model: RigModel; mode: RigModel["modes"][number]; loadsOn: string[]; onSubmit: (name: string) => Promise<unknown>; onDone: () => void }) {
  const [name, setName] = useState("");
  const { error, setError, busy, save } = useSaving();
  const id = useId();
  return (
    <form
      className="space-y-3"
      noValidate
      onSubmit={async (e) => {
        e.preventDefault();
        if (!name.trim()) return setError("Give the mode a name.");
        if (model.modes.some((m) => m.name.toLowerCase() === name.trim().toLowerCase())) return setError("A mode with this name exists already.");
        await save(() => onSubmit(name.trim()), onDone);
      }}
    >
      <p className="text-night-200">
        The {loadsOn.length} loads switched on now, with their hours from “{mode.name}” (24 h for loads not in it). This saves a new revision of the rig.
      </p>
      <label htmlFor={id} className="block font-bold">
        Name
      </label>
      <input id={id} value={name} maxLength={60} onChange={(e) => setName(e.target.value)} className="min-h-12 w-full rounded-xl border border-night-600 bg-night-950 px-3 text-lg" />
      {error ? (
        <p role="alert" className="font-bold text-ember-300">
          {error}
        </p>
      ) : null}
      <Button type="submit" variant="primary" disabled={busy} className="w-full">
        {busy ? "Saving…" : "Save mode"}
      </Button>
    </form>
  );
}

function HoursForm({ model, mode, onSubmit, onDone }: { model: RigModel; mode: RigModel["modes"][number]; onSubmit: (loads: Array<{ loadId: string; hoursPerDay: number }>) => Promise<unknown>; onDone: () => void }) {
  const [hours, setHours] = useState<Record<string, string>>(() =>
    Object.fromEntries(model.loads.map((l) => [l.id, String(mode.loads.find((x) => x.loadId === l.id)?.hoursPerDay ?? 0)])),
  );
  const { error, setError, busy, save } = useSaving();
  return (
    <form
      className="space-y-3"
      noValidate
      onSubmit={async (e) => {
        e.preventDefault();
        const loads: Array<{ loadId: string; hoursPerDay: number }> = [];
        for (const l of model.loads) {
          const v = Number((hours[l.id] ?? "0").replace(",", "."));
          if (!Number.isFinite(v) || v < 0 || v > 24) return setError(`${l.name}: hours per day are between 0 and 24.`);
          const was = mode.loads.find((x) => x.loadId === l.id)?.hoursPerDay ?? 0;
          if (v !== was) loads.push({ loadId: l.id, hoursPerDay: v });
        }
        if (!loads.length) return onDone();
        await save(() => onSubmit(loads), onDone);
      }}
    >
      <ul className="space-y-2">
        {model.loads.map((l) => (
          <li key={l.id} className="flex items-center justify-between gap-3">
            <label htmlFor={`hours-${l.id}`}>{l.name}</label>
            <span className="flex items-center gap-2">
              <input
                id={`hours-${l.id}`}
                inputMode="decimal"
                value={hours[l.id] ?? ""}
                onChange={(e) => setHours((h) => ({ ...h, [l.id]: e.target.value }))}
                className="tabular min-h-12 w-20 rounded-xl border border-night-600 bg-night-950 px-3 text-right"
              />
              <span className="text-night-300">h</span>
            </span>
          </li>
        ))}
      </ul>
      {error ? (
        <p role="alert" className="font-bold text-ember-300">
          {error}
        </p>
      ) : null}
      <Button type="submit" variant="primary" disabled={busy} className="w-full">
        {busy ? "Saving…" : "Save hours"}
      </Button>
    </form>
  );
}
