/**
 * The Now screen: how long the bank lasts at the present plan, and whether it makes it to the
 * next charge. It computes everything in the browser from the model and state it is HANDED
 * (props); it never waits on the server to show a number. Changes go out through `onChange`.
 */
import { lazy, Suspense, useEffect, useLayoutEffect, useMemo, useRef, useState } from "react";
import { Link } from "react-router";
import type { Role } from "~/auth/roles";
import type { RigModel } from "~/engine/model";
import { Button } from "~/components/ui/button";
import { Sheet } from "~/components/ui/sheet";
import { cn } from "~/lib/cn";
import { socEntryFor, type LatestReading, type RigState, type SocEntry, type StateChange } from "~/schemas/rig-state";
import { chartSeries, computeNow, loadCost, placeOf, type ChartSeries, type LoadCost, type NowResult } from "./now-model";
import { ExplainProvider, Explainable, restingAdvice, type Explanation } from "./explain";
import { HorizonBand } from "./horizon-band";
import { LoadSwitches, StandbyList } from "./load-switches";
import { ModesBar, type ModeEditBody } from "./modes";
import { PlaceWeather } from "./place-weather";
import { SocEntryForm, type SocEntryTab } from "./soc-entry";
import { primaryBank } from "~/engine/primary-bank";
import { DawnPlanCard } from "./dawn-plan";
import { formatA, formatAgo, formatClock, formatDuration, formatPct, formatW } from "./format";
import { dayKey, formatDayTime, formatTime, type Clock, type TimeSettings } from "~/lib/datetime";

const ProjectionChart = lazy(() => import("./projection-chart"));


export interface NowScreenProps {
  rigId: string;
  rigName: string;
  model: RigModel;
  revision: number;
  state: RigState;
  role: Role;
  latestReading: LatestReading | null;
  /** Server time when the page was rendered (keeps server and first client render equal). */
  initialNowMs: number;
  onChange: (c: StateChange) => void;
  onModeEdit?: (body: ModeEditBody) => Promise<unknown>;
  status?: "idle" | "saving" | "offline" | "error";
  notices?: Array<{ id: number; tone: "info" | "warn" | "error"; text: string }>;
  /** The person's 12- or 24-hour clock (times are in the rig's time zone). */
  clock?: Clock;
}

/** A SoC older than this is flagged as stale; with nothing newer, the runway is not shown as a fact. */
export const STALE_AFTER_MS = 6 * 3_600_000;

/**
 * How the screen knows the primary bank's SoC: a fresh entry ("known"), a fresh logbook
 * reading with a SoC that carries a missing or stale entry forward ("carried"), or not at all
 * ("unknown": no entry, or a stale one with no fresh reading).
 */
export type SocKnowledge = { kind: "known" } | { kind: "carried"; entry: SocEntry } | { kind: "unknown"; stale: SocEntry | null };

export function socKnowledge(model: RigModel, state: RigState, latestReading: LatestReading | null, atMs: number): SocKnowledge {
  const pid = primaryBank(model).id;
  const entry = socEntryFor(state, pid, pid);
  if (entry && atMs - Date.parse(entry.takenAt) <= STALE_AFTER_MS) return { kind: "known" };
  const readingAt = latestReading ? Date.parse(latestReading.takenAt) : NaN;
  if (
    latestReading &&
    latestReading.socPct !== null &&
    atMs - readingAt <= STALE_AFTER_MS &&
    (!entry || readingAt > Date.parse(entry.takenAt))
  ) {
    return { kind: "carried", entry: { socPct: latestReading.socPct, source: "logbook", takenAt: latestReading.takenAt } };
  }
  return { kind: "unknown", stale: entry };
}

/** The state the projection runs on: a carried reading fills in; with no SoC, a full bank gives the upper bound. */
function planningState(state: RigState, knowledge: SocKnowledge, atMs: number): RigState {
  if (knowledge.kind === "known") return state;
  const soc: SocEntry = knowledge.kind === "carried" ? knowledge.entry : { socPct: 100, source: "entered", takenAt: new Date(atMs).toISOString() };
  return { ...state, soc };
}

const windowWords = { sun: "sun strong enough", drive: "a drive", shore: "shore power", generator: "the generator", charger: "a charger" } as const;
/** The next charging window named for what it is: the sun counts from when it out-gives the loads, not from sunrise. */
const windowNames = { sun: "the sun is strong enough", drive: "the next drive", shore: "shore power", generator: "the generator runs", charger: "a charger" } as const;

/** "11:58" later today, "Fri 11:58" on another day: in the rig's time zone, on the person's clock. */
function clockWords(ms: number, atMs: number, time: TimeSettings): string {
  return dayKey(ms, time.timeZone) === dayKey(atMs, time.timeZone) ? formatTime(ms, time) : formatDayTime(ms, time);
}

/** The verdict's headline: "Makes it till the sun is strong enough, about 11:58". */
export function verdictHeadline(now: NowResult, atMs: number, time: TimeSettings): string {
  const td = now.bank.tillDawn;
  if (td.chargingNow) return "Charging now";
  if (td.nextWindowMs === null) return td.reaches ? `Stays above the floor for ${now.projection.horizonH} h` : `No charge in ${now.projection.horizonH} h`;
  const window = `${windowNames[td.nextWindowKind ?? "sun"]}, about ${clockWords(td.nextWindowMs, atMs, time)}`;
  return td.reaches ? `Makes it till ${window}` : `Falls short before ${window}`;
}
const sourceWords = { entered: "entered by hand", resting_voltage: "estimated from a resting voltage", logbook: "from the logbook" } as const;

export function NowScreen(props: NowScreenProps) {
  const { model, state, role, rigId } = props;
  const canWrite = role !== "guest";
  const [clock, setClock] = useState(() => Math.floor(props.initialNowMs / 60_000) * 60_000);
  const [pinned, setPinned] = useState<number | null>(null);
  useEffect(() => {
    const tick = () => setClock(Math.floor(Date.now() / 60_000) * 60_000);
    const t = setInterval(tick, 30_000);
    return () => clearInterval(t);
  }, []);
  const atMs = pinned ?? clock;

  const knowledge = useMemo(() => socKnowledge(model, state, props.latestReading, atMs), [model, state, props.latestReading, atMs]);
  const result = useMemo((): { ok: true; now: NowResult } | { ok: false; message: string } => {
    try {
      return { ok: true, now: computeNow({ model, state: planningState(state, knowledge, atMs), atMs }) };
    } catch (error) {
      return { ok: false, message: error instanceof Error ? error.message : String(error) };
    }
  }, [model, state, knowledge, atMs]);

  if (!result.ok) {
    return (
      <div role="alert" className="space-y-2 rounded-2xl border border-ember-500 bg-night-900 p-4">
        <h1 className="text-2xl font-bold">{props.rigName}</h1>
        <p>The runway could not be computed from this rig&apos;s model: {result.message}</p>
        <Link to={`/rigs/${rigId}/model`} className="font-bold text-dawn-300 underline">
          Look at the rig as built
        </Link>
      </div>
    );
  }
  return (
    <ExplainProvider time={{ timeZone: model.timeZone, clock: props.clock ?? "24h" }}>
      <NowBody {...props} knowledge={knowledge} now={result.now} atMs={atMs} pinned={pinned} setPinned={setPinned} canWrite={canWrite} />
    </ExplainProvider>
  );
}

function NowBody({
  rigId,
  rigName,
  model,
  revision,
  state,
  role,
  latestReading,
  onChange,
  onModeEdit,
  status = "idle",
  notices = [],
  now,
  atMs,
  pinned,
  setPinned,
  canWrite,
  knowledge,
  clock = "24h",
}: NowScreenProps & { knowledge: SocKnowledge; now: NowResult; atMs: number; pinned: number | null; setPinned: (ms: number | null) => void; canWrite: boolean }) {
  const [socOpen, setSocOpen] = useState(false);
  const [socTab, setSocTab] = useState<SocEntryTab>("soc");
  const openSoc = (tab: SocEntryTab) => {
    setSocTab(tab);
    setSocOpen(true);
  };
  const unknown = knowledge.kind === "unknown";
  const [socBankId, setSocBankId] = useState<string>(() => (model.banks.find((b) => b.role === "house") ?? model.banks[0]!).id);
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  const bank = now.bank;
  const td = bank.tillDawn;
  const horizonH = now.projection.horizonH;
  const tz = model.timeZone;
  const time = useMemo((): TimeSettings => ({ timeZone: tz, clock }), [tz, clock]);

  // Toggle latency: marked when the new runway is in the DOM (bench: scripts/bench-now.ts).
  useLayoutEffect(() => {
    if (typeof performance !== "undefined") performance.mark("now:runway");
  }, [now]);

  const series: ChartSeries | null = useMemo(() => (hydrated ? chartSeries(model, now) : null), [hydrated, model, now]);
  const costs = useLoadCosts(model, state, atMs, now, hydrated);

  const soc = knowledge.kind === "carried" ? knowledge.entry : knowledge.kind === "unknown" ? knowledge.stale : state.soc;
  const socAgeMs = soc ? atMs - Date.parse(soc.takenAt) : null;
  const stale = socAgeMs !== null && socAgeMs > STALE_AFTER_MS;
  const place = placeOf(model, state);
  const mode = model.modes.find((m) => m.id === now.engineState.modeId) ?? model.modes[0]!;

  const change = (c: StateChange) => {
    performance.mark("now:toggle");
    onChange(c);
  };

  const explainRunway = (): Explanation => ({
    title: "Runway",
    value: unknown ? `at most ${formatDuration(bank.runwayH, horizonH)}` : formatDuration(bank.runwayH, horizonH),
    plain: unknown
      ? `The state of charge is not known, so this is only the upper end of a range: starting from a full bank (100 %) the ${now.bankModel.name.toLowerCase()} ${bank.runwayH === null ? `stays above its usable floor (${formatPct(bank.stopSocPct)}) for the whole ${horizonH} hours the projection looks ahead` : `reaches its usable floor of ${formatPct(bank.stopSocPct)} after ${formatDuration(bank.runwayH)}`}. A bank that is not full lasts less, down to nothing at the floor. Enter the SoC for a true runway.`
      : bank.runwayH === null
        ? `At this plan the ${now.bankModel.name.toLowerCase()} stays above its usable floor (${formatPct(bank.stopSocPct)}) for the whole ${horizonH} hours the projection looks ahead.`
        : `Starting from ${formatPct(bank.startSocPct)} the ${now.bankModel.name.toLowerCase()} reaches its usable floor of ${formatPct(bank.stopSocPct)} after ${formatDuration(bank.runwayH)}, counting the loads at their hours in "${mode.name}", standby draws and the sun at ${place.label}, step by step every ${now.projection.stepMin} minutes.`,
    how: bank.how,
    source: "Tilldawn's projection; Peukert's law for discharge; clear-sky sun scaled by the weather choice.",
  });
  const explainVerdict = (): Explanation => ({
    title: "Till the next charge",
    value: unknown ? (td.reaches ? "Not known" : "Falls short") : td.reaches ? "Makes it" : "Falls short",
    plain: unknown
      ? `${unknownVerdictSentence(now, atMs, time)} The state of charge is not known; these figures start from a full bank, the best case.`
      : verdictSentence(now, atMs, time),
    how: td.how,
  });
  const explainNet = (): Explanation => ({
    title: "Right now",
    value: `${formatW(now.present.netW)} · ${formatA(now.present.netA)}`,
    plain: `Loads and standby draw ${formatW(now.present.drawW)} from the bank at this moment of the plan; sources give ${formatW(now.present.sourceW)} (solar ${formatW(now.present.solarW)}). The difference, at the bank's ${now.present.bankV} V, is ${formatA(now.present.netA)}.`,
    inputs: [
      ["Draw now", formatW(now.present.drawW)],
      ["Sources now", formatW(now.present.sourceW)],
      ["Bank voltage (nominal)", `${now.present.bankV} V`],
    ],
    source: "The engine's draw profile for this 5-minute slot and its solar model at the rig's place.",
  });
  const explainSoc = (): Explanation => ({
    title: "State of charge",
    value: unknown ? "unknown" : formatPct(bank.startSocPct),
    plain: unknown
      ? soc
        ? `The last state of charge (${formatPct(soc.socPct)}, ${sourceWords[soc.source]}) was read ${formatAgo(Date.parse(soc.takenAt), atMs)}, too long ago to plan from, and the logbook has no newer reading with a SoC. The runway is shown only as an upper bound until it is entered again.`
        : "Nobody has entered the state of charge yet. The runway is shown only as an upper bound (from a full bank) until it is entered."
      : !soc
      ? "Nobody has entered the state of charge yet."
      : `${formatPct(bank.startSocPct)} ${sourceWords[soc.source]}, read ${formatAgo(Date.parse(soc.takenAt), atMs)} (${clockWords(Date.parse(soc.takenAt), atMs, time)}).${soc.restingV !== undefined ? ` Resting voltage ${soc.restingV}\u00a0V. ${restingAdvice(now.bankModel.chemistry)}` : ""}`,
    ...(now.socEstimate ? { how: { ...now.socEstimate.how, note: restingAdvice(now.bankModel.chemistry) } } : {}),
    inputs: [
      ["Usable floor", formatPct(bank.stopSocPct)],
      ["SoC at the low-voltage cutoff", formatPct(now.cutoffSocPct)],
      ["Confidence", bank.startSocConfidence],
    ],
  });

  return (
    <div className="space-y-6 pb-4">
      <header className="flex flex-wrap items-end justify-between gap-2">
        <div>
          <p className="text-sm font-bold uppercase tracking-widest text-dawn-400">Now</p>
          <h1 className="text-3xl font-bold">{rigName}</h1>
        </div>
        <SyncBadge status={status} role={role} />
      </header>

      {notices.length ? (
        <ul className="space-y-2" aria-live="polite">
          {notices.map((n) => (
            <li key={n.id} className={cn("rounded-xl border p-3 font-bold", n.tone === "error" ? "border-ember-500 text-ember-300" : n.tone === "warn" ? "border-dawn-600 text-dawn-300" : "border-night-600 text-night-200")}>
              {n.text}
            </li>
          ))}
        </ul>
      ) : null}

      <section aria-labelledby="bank-heading" className="space-y-3 rounded-3xl border border-night-700 bg-night-900 p-4">
        <div className="flex items-baseline justify-between gap-2">
          <h2 id="bank-heading" className="text-lg font-bold text-night-200">
            {now.bankModel.name}
          </h2>
          <Explainable explanation={explainSoc} className="text-3xl font-bold">
            <span data-testid="soc">{unknown ? "unknown" : formatPct(bank.startSocPct)}</span>
          </Explainable>
        </div>
        <HorizonBand socPct={unknown ? null : bank.startSocPct} stopSocPct={bank.stopSocPct} lowConfidence={bank.startSocConfidence === "low"} />
        <div className="flex flex-wrap items-center justify-between gap-2">
          <p className={cn("text-sm", unknown ? "font-bold text-ember-300" : "text-night-200")}>
            {!soc
              ? "No SoC entered yet."
              : unknown
                ? `Last SoC ${formatAgo(Date.parse(soc.takenAt), atMs)}: too old to plan from.`
                : `${knowledge.kind === "carried" ? "latest logbook reading" : sourceWords[soc.source]}, ${formatAgo(Date.parse(soc.takenAt), atMs)}${stale ? " — stale, the bank has been used since" : ""}${now.socEstimate?.flatCurve ? " — low confidence (flat LiFePO4 curve)" : ""}`}
          </p>
          {canWrite ? (
            <Button variant={!unknown && stale ? "primary" : "quiet"} onClick={() => openSoc("soc")}>
              Update SoC
            </Button>
          ) : null}
        </div>

        {unknown ? (
          <div role="group" aria-labelledby="soc-first-heading" data-testid="soc-first" className="space-y-2 rounded-2xl border-2 border-dashed border-dawn-500 p-3">
            <h3 id="soc-first-heading" className="text-xl font-bold">
              How full is the bank?
            </h3>
            <p className="text-night-100">
              {soc ? "The last state of charge is too old and the logbook has nothing newer" : "The state of charge is not known yet"}, so the runway below is only the most it could be.{" "}
              {canWrite ? "Give it first, one of three ways:" : "The owner or crew can enter it."}
            </p>
            {canWrite ? (
              <div className="grid gap-2 sm:grid-cols-3">
                <Button variant="primary" onClick={() => openSoc("soc")}>
                  Enter the SoC
                </Button>
                <Button variant="quiet" onClick={() => openSoc("voltage")}>
                  From a resting voltage
                </Button>
                <Button variant="quiet" onClick={() => openSoc("logbook")}>
                  From the latest reading
                </Button>
              </div>
            ) : null}
          </div>
        ) : null}

        <div className="border-t border-night-700 pt-3">
          <p className="text-sm font-bold uppercase tracking-wider text-night-300">{unknown ? "Runway, at most" : "Runway"}</p>
          <p aria-live="polite" aria-atomic="true" className="text-5xl font-bold leading-tight">
            <Explainable explanation={explainRunway}>
              <span data-testid="runway">{unknown ? `0 to ${formatDuration(bank.runwayH, horizonH)}` : formatDuration(bank.runwayH, horizonH)}</span>
            </Explainable>
          </p>
          <p className="text-night-200">
            {unknown
              ? `to the usable floor (${formatPct(bank.stopSocPct)}) at the present plan; the upper end only if the bank is full`
              : `to the usable floor (${formatPct(bank.stopSocPct)}) at the present plan`}
          </p>
        </div>

        {unknown ? (
          <div data-testid="verdict-box" data-tone={td.reaches ? "wait" : "bad"} className={cn("rounded-2xl border-2 border-dashed p-3", td.reaches ? "border-night-500" : "border-ember-500")}>
            <Explainable explanation={explainVerdict} className="block w-full no-underline">
              <span className={cn("block text-xl font-bold", td.reaches ? "text-night-100" : "text-ember-500")} data-testid="verdict">
                {td.reaches ? "Till the next charge: not known until the SoC is given" : `${verdictHeadline(now, atMs, time)}, even from a full bank`}
              </span>
              <span className="block text-night-100">{unknownVerdictSentence(now, atMs, time)}</span>
            </Explainable>
          </div>
        ) : (
        <div data-testid="verdict-box" data-tone={td.reaches ? "good" : "bad"} className={cn("rounded-2xl border p-3", td.reaches ? "border-leaf-400" : "border-ember-500")}>
          <Explainable explanation={explainVerdict} className="block w-full no-underline">
            <span className={cn("block text-xl font-bold", td.reaches ? "text-leaf-400" : "text-ember-500")} data-testid="verdict">
              {verdictHeadline(now, atMs, time)}
            </span>
            <span className="block text-night-100">{verdictSentence(now, atMs, time)}</span>
          </Explainable>
        </div>
        )}

        <dl className="grid grid-cols-2 gap-3 md:grid-cols-3">
          <div>
            <dt className="text-sm text-night-300">{now.present.netW >= 0 ? "Charging now" : "Drawing now"}</dt>
            <dd className="text-lg font-bold">
              <Explainable explanation={explainNet}>
                <span data-testid="net">
                  {formatW(Math.abs(now.present.netW))} · {formatA(Math.abs(now.present.netA))}
                </span>
              </Explainable>
            </dd>
          </div>
          <div>
            <dt className="text-sm text-night-300">Next charge</dt>
            <dd className="text-lg font-bold">
              <Explainable explanation={explainVerdict}>
                {td.chargingNow ? "now" : td.nextWindowMs === null ? `none in ${horizonH} h` : `${clockWords(td.nextWindowMs, atMs, time)}, ${windowWords[td.nextWindowKind ?? "sun"]}`}
              </Explainable>
            </dd>
          </div>
          <div>
            <dt className="text-sm text-night-300">SoC at sunrise</dt>
            <dd className="text-lg font-bold">
              <Explainable
                explanation={{
                  title: "SoC at sunrise",
                  value: unknown || bank.socAtNextSunrisePct === null ? "—" : formatPct(bank.socAtNextSunrisePct),
                  plain:
                    unknown
                      ? "Not known until the state of charge is given."
                      : now.projection.nextSunriseMs === null
                      ? "The sun does not rise within the projection at this place."
                      : `The projection's state of charge at the next sunrise, ${clockWords(now.projection.nextSunriseMs, atMs, time)} at ${place.label}.`,
                  how: bank.how,
                }}
              >
                {unknown || bank.socAtNextSunrisePct === null ? "—" : formatPct(bank.socAtNextSunrisePct)}
              </Explainable>
            </dd>
          </div>
        </dl>
      </section>

      {hydrated && !unknown ? <DawnPlanCard model={model} now={now} canWrite={canWrite} onChange={change} /> : null}

      <ModesBar
        model={model}
        modeId={mode.id}
        canWrite={canWrite}
        isOwner={role === "owner"}
        loadsOn={now.engineState.loadsOn ?? []}
        inverterIdsOn={mode.inverterIdsOn}
        revision={revision}
        onChange={change}
        {...(onModeEdit ? { onModeEdit } : {})}
      />

      <LoadSwitches model={model} state={state} now={now} costs={costs} canWrite={canWrite} onChange={change} />

      <StandbyList items={now.projection.budget.standby} />

      <section aria-labelledby="chart-heading" className="space-y-2 rounded-2xl border border-night-700 bg-night-900 p-3">
        <h2 id="chart-heading" className="text-xl font-bold">
          Next {horizonH} hours
        </h2>
        <ChartKey />
        {hydrated && series ? (
          <Suspense fallback={<div className="h-[264px] animate-pulse rounded-xl bg-night-800" />}>
            <ProjectionChart series={series} timeZone={tz} />
          </Suspense>
        ) : (
          <div className="h-[264px] rounded-xl bg-night-800" />
        )}
        {series ? <ProjectionTable series={series} timeZone={tz} /> : null}
      </section>

      <PlaceWeather model={model} state={state} canWrite={canWrite} onChange={change} atMs={atMs} pinnedAtMs={pinned} onPinTime={setPinned} />

      <nav aria-label="More about this rig" className="grid grid-cols-2 gap-2">
        <Link to={`/rigs/${rigId}/budget`} className="flex min-h-14 items-center justify-center rounded-2xl border border-night-600 font-bold hover:border-dawn-500">
          Day budget
        </Link>
        <Link to={`/rigs/${rigId}/model`} className="flex min-h-14 items-center justify-center rounded-2xl border border-night-600 font-bold hover:border-dawn-500">
          Rig as built
        </Link>
      </nav>

      <p className="text-sm text-night-300">
        A planning aid, not a safety device: the bank&apos;s BMS or low-voltage disconnect protects it. Lithium batteries, wiring and shore power can hurt people and start fires; follow local codes and licensed practice.
      </p>

      <Sheet open={socOpen} onClose={() => setSocOpen(false)} title="State of charge">
        {socOpen ? (
          <div className="space-y-3">
          {model.banks.length > 1 ? (
            <fieldset className="flex flex-wrap gap-2">
              <legend className="mb-1 text-sm text-night-300">Bank</legend>
              {model.banks.map((b) => (
                <button key={b.id} type="button" aria-pressed={socBankId === b.id} onClick={() => setSocBankId(b.id)}
                  className={cn("min-h-11 rounded-xl border px-3", socBankId === b.id ? "border-dawn-400 bg-dawn-500 text-night-950" : "border-night-600")}>
                  {b.name}
                </button>
              ))}
            </fieldset>
          ) : null}
          <SocEntryForm
            key={`${socBankId}-${socTab}`}
            initialTab={socTab}
            bank={model.banks.find((b) => b.id === socBankId) ?? now.bankModel}
            timeZone={tz}
            nowMs={Date.now()}
            latestReading={latestReading}
            onCancel={() => setSocOpen(false)}
            onSave={(s: SocEntry) => {
              setSocOpen(false);
              change(socBankId === now.bankModel.id ? { kind: "soc", soc: s } : { kind: "soc", soc: s, bankId: socBankId });
            }}
          />
          </div>
        ) : null}
      </Sheet>
    </div>
  );
}

function verdictSentence(now: NowResult, atMs: number, time: TimeSettings): string {
  const td = now.bank.tillDawn;
  if (td.chargingNow) return "Charging now: sources give more than the loads draw.";
  if (td.nextWindowMs === null) {
    return now.bank.runwayH === null
      ? `No charge expected in ${now.projection.horizonH} h, and the bank stays above its floor.`
      : `No charge expected in ${now.projection.horizonH} h; the floor comes in ${formatDuration(now.bank.runwayH)}.`;
  }
  const when = clockWords(td.nextWindowMs, atMs, time);
  const what = windowNames[td.nextWindowKind ?? "sun"];
  if (td.reaches) {
    const spare = td.marginSocPct === null ? "" : ` with ${formatPct(td.marginSocPct)} above the floor`;
    const margin = td.marginH === null ? "" : ` and ${formatDuration(td.marginH)} to spare`;
    return `At about ${when}, when ${what}, the bank is still${spare || " above the floor"}${margin}.`;
  }
  return `The bank reaches its floor ${formatDuration(Math.abs(td.marginH ?? 0))} before ${what}, about ${when}.`;
}

/** With no SoC known the projection starts from a full bank: only "falls short" is a fact then. */
function unknownVerdictSentence(now: NowResult, atMs: number, time: TimeSettings): string {
  const td = now.bank.tillDawn;
  if (td.chargingNow) return "Charging now: sources give more than the loads draw.";
  if (td.nextWindowMs === null) return `No charge expected in ${now.projection.horizonH} h.`;
  const when = clockWords(td.nextWindowMs, atMs, time);
  const what = windowNames[td.nextWindowKind ?? "sun"];
  return td.reaches
    ? `A full bank would last till ${what}, about ${when}; a less full one may not.`
    : `Even a full bank reaches the floor ${formatDuration(Math.abs(td.marginH ?? 0))} before ${what}, about ${when}.`;
}

function SyncBadge({ status, role }: { status: "idle" | "saving" | "offline" | "error"; role: Role }) {
  const text = role === "guest" ? "Read-only (guest)" : { idle: "Saved", saving: "Saving…", offline: "Offline", error: "Not synced" }[status];
  return (
    <p role="status" className={cn("rounded-full px-3 py-1 text-sm font-bold", status === "error" || status === "offline" ? "bg-night-800 text-ember-300" : "bg-night-800 text-night-200")} data-testid="sync-status">
      {text}
    </p>
  );
}

function ChartKey() {
  const item = (cls: string, label: string) => (
    <span className="flex items-center gap-1">
      <span aria-hidden="true" className={cn("inline-block h-1 w-5 rounded", cls)} />
      {label}
    </span>
  );
  return (
    <p className="flex flex-wrap gap-x-4 gap-y-1 text-sm text-night-200">
      {item("bg-dawn-400", "SoC %")}
      {item("bg-leaf-400", "Charge W")}
      {item("bg-ember-300", "Draw W")}
      {item("bg-ember-500", "Floor")}
      {item("bg-night-700", "Night")}
    </p>
  );
}

function ProjectionTable({ series, timeZone }: { series: ChartSeries; timeZone: string }) {
  const rows: number[] = [];
  const everyH = 3;
  const stride = Math.max(1, Math.round((everyH * 3600) / ((series.t[1] ?? 0) - (series.t[0] ?? 0) || 900)));
  for (let i = 0; i < series.t.length; i += stride) rows.push(i);
  return (
    <details>
      <summary className="flex min-h-12 cursor-pointer items-center font-bold text-dawn-300">Show the projection as a table</summary>
      <table className="tabular w-full text-left text-sm">
        <caption className="sr-only">Projected state of charge, charge and draw every {everyH} hours</caption>
        <thead>
          <tr className="text-night-300">
            <th scope="col" className="py-1">
              Time
            </th>
            <th scope="col">SoC</th>
            <th scope="col">Charge</th>
            <th scope="col">Draw</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((i) => (
            <tr key={i} className="border-t border-night-800">
              <th scope="row" className="py-1 font-normal">
                {formatClock(series.t[i]! * 1000, timeZone)}
              </th>
              <td>{formatPct(series.socPct[i]!)}</td>
              <td>{formatW(series.solarW[i]!)}</td>
              <td>{formatW(series.drawW[i]!)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </details>
  );
}

/** Per-load runway costs, computed off the main path one load at a time after each change. */
function useLoadCosts(model: RigModel, state: RigState, atMs: number, now: NowResult, enabled: boolean): Map<string, LoadCost> {
  const [costs, setCosts] = useState<Map<string, LoadCost>>(new Map());
  const latest = useRef({ model, state, atMs, now });
  latest.current = { model, state, atMs, now };
  useEffect(() => {
    if (!enabled) return;
    let cancelled = false;
    const out = new Map<string, LoadCost>();
    let i = 0;
    let timer: ReturnType<typeof setTimeout>;
    const step = () => {
      if (cancelled) return;
      const { model: m, state: s, atMs: a, now: n } = latest.current;
      const load = m.loads[i++];
      if (!load) {
        setCosts(out);
        return;
      }
      out.set(load.id, loadCost(m, s, a, load.id, n));
      timer = setTimeout(step, 0);
    };
    timer = setTimeout(step, 60);
    return () => {
      cancelled = true;
      clearTimeout(timer);
    };
  }, [now, enabled]);
  return costs;
}
