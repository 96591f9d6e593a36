import { useId, useState } from "react";
import type { RigModel } from "~/engine/model";
import { utcOffsetMinutes } from "~/engine/solar";
import { Button } from "~/components/ui/button";
import { cn } from "~/lib/cn";
import { placeSchema, weatherSchema, type RigState, type StateChange, type Weather } from "~/schemas/rig-state";
import { fromLocalInput, toLocalInput } from "./format";

const weatherChoices: Array<[Weather["kind"], string]> = [
  ["clear", "Clear"],
  ["hazy", "Hazy"],
  ["overcast", "Overcast"],
  ["percent", "Percent"],
];

/** Place (phone location, typed, or the rig's home), weather for the solar estimate, and the time to plan from. */
export function PlaceWeather({
  model,
  state,
  canWrite,
  onChange,
  atMs,
  pinnedAtMs,
  onPinTime,
}: {
  model: RigModel;
  state: RigState;
  canWrite: boolean;
  onChange: (c: StateChange) => void;
  atMs: number;
  pinnedAtMs: number | null;
  onPinTime: (ms: number | null) => void;
}) {
  const ids = { lat: useId(), lon: useId(), pct: useId(), time: useId() };
  const [lat, setLat] = useState(state.place.kind === "home" ? "" : String(state.place.latDeg));
  const [lon, setLon] = useState(state.place.kind === "home" ? "" : String(state.place.lonDeg));
  const [pct, setPct] = useState(state.weather.kind === "percent" ? String(state.weather.pct) : "60");
  const [message, setMessage] = useState<{ tone: "error" | "info"; text: string } | null>(null);

  const where =
    state.place.kind === "home"
      ? `Home (${model.home.latDeg.toFixed(2)}°, ${model.home.lonDeg.toFixed(2)}°)`
      : `${state.place.kind === "device" ? "Phone location" : "Typed"} (${state.place.latDeg.toFixed(2)}°, ${state.place.lonDeg.toFixed(2)}°)`;

  const locate = () => {
    setMessage(null);
    if (!("geolocation" in navigator)) return setMessage({ tone: "error", text: "This browser cannot share its location; type latitude and longitude instead." });
    setMessage({ tone: "info", text: "Asking the phone for its location…" });
    navigator.geolocation.getCurrentPosition(
      (pos) => {
        setMessage(null);
        const place = { kind: "device" as const, latDeg: +pos.coords.latitude.toFixed(4), lonDeg: +pos.coords.longitude.toFixed(4), accuracyM: Math.round(pos.coords.accuracy) };
        setLat(String(place.latDeg));
        setLon(String(place.lonDeg));
        onChange({ kind: "place", place });
      },
      (err) =>
        setMessage({
          tone: "error",
          text: err.code === err.PERMISSION_DENIED ? "Location permission was refused. Type latitude and longitude, or use the rig's home." : "The phone could not find its location. Type it instead.",
        }),
      { enableHighAccuracy: false, timeout: 15_000, maximumAge: 600_000 },
    );
  };

  const saveTyped = (e: React.FormEvent) => {
    e.preventDefault();
    const parsed = placeSchema.safeParse({ kind: "typed", latDeg: Number(lat.replace(",", ".")), lonDeg: Number(lon.replace(",", ".")) });
    if (!lat.trim() || !lon.trim() || !parsed.success) {
      return setMessage({ tone: "error", text: parsed.success ? "Give both latitude and longitude." : parsed.error.issues[0]!.message });
    }
    setMessage(null);
    onChange({ kind: "place", place: parsed.data });
  };

  const setWeather = (kind: Weather["kind"]) => {
    if (kind !== "percent") return onChange({ kind: "place", weather: { kind } });
    const w = weatherSchema.safeParse({ kind, pct: Number(pct) });
    if (!w.success) return setMessage({ tone: "error", text: "Weather percent is between 0 and 100." });
    onChange({ kind: "place", weather: w.data });
  };

  return (
    <section aria-labelledby="place-heading" className="space-y-4 rounded-2xl border border-night-700 bg-night-900 p-4">
      <h2 id="place-heading" className="text-xl font-bold">
        Place, weather and time
      </h2>
      <div className="space-y-2">
        <p>
          <span className="text-night-300">Sun computed for </span>
          <span className="tabular font-bold">{where}</span>
        </p>
        {canWrite ? (
          <>
            <div className="flex flex-wrap gap-2">
              <Button variant="outline" onClick={locate}>
                Use this phone&apos;s location
              </Button>
              <Button variant="outline" disabled={state.place.kind === "home"} onClick={() => onChange({ kind: "place", place: { kind: "home" } })}>
                Use the rig&apos;s home
              </Button>
            </div>
            <form onSubmit={saveTyped} noValidate className="flex flex-wrap items-end gap-2">
              <label htmlFor={ids.lat} className="flex flex-col text-sm font-bold">
                Latitude °
                <input id={ids.lat} inputMode="decimal" value={lat} onChange={(e) => setLat(e.target.value)} placeholder="38.5" className="tabular min-h-12 w-28 rounded-xl border border-night-600 bg-night-950 px-3 text-base font-normal" />
              </label>
              <label htmlFor={ids.lon} className="flex flex-col text-sm font-bold">
                Longitude °
                <input id={ids.lon} inputMode="decimal" value={lon} onChange={(e) => setLon(e.target.value)} placeholder="-109.6" className="tabular min-h-12 w-28 rounded-xl border border-night-600 bg-night-950 px-3 text-base font-normal" />
              </label>
              <Button type="submit" variant="quiet">
                Set position
              </Button>
            </form>
          </>
        ) : null}
      </div>

      <fieldset className="space-y-2">
        <legend className="font-bold">Weather for the solar estimate</legend>
        <div className="flex flex-wrap gap-2">
          {weatherChoices.map(([kind, label]) => (
            <button
              key={kind}
              type="button"
              aria-pressed={state.weather.kind === kind}
              disabled={!canWrite}
              onClick={() => setWeather(kind)}
              className={cn(
                "min-h-12 rounded-xl border px-4 font-bold",
                state.weather.kind === kind ? "border-dawn-400 bg-dawn-500 text-night-950" : "border-night-600 bg-night-950",
              )}
            >
              {label}
              {kind === "percent" && state.weather.kind === "percent" ? ` ${state.weather.pct} %` : ""}
            </button>
          ))}
        </div>
        {canWrite ? (
          <label htmlFor={ids.pct} className="flex items-center gap-2 text-sm">
            Percent of clear-sky sun
            <input id={ids.pct} inputMode="decimal" value={pct} onChange={(e) => setPct(e.target.value)} onBlur={() => state.weather.kind === "percent" && setWeather("percent")} className="tabular min-h-12 w-20 rounded-xl border border-night-600 bg-night-950 px-3 text-right" />
            %
          </label>
        ) : null}
        <p className="text-sm text-night-300">Clear uses the full clear-sky sun, hazy half of it, overcast a fifth.</p>
      </fieldset>

      <div className="space-y-2">
        <label htmlFor={ids.time} className="block font-bold">
          Plan from (rig time, {model.timeZone})
        </label>
        <div className="flex flex-wrap gap-2">
          <input
            id={ids.time}
            type="datetime-local"
            value={toLocalInput(atMs, model.timeZone)}
            onChange={(e) => {
              const ms = fromLocalInput(e.target.value, model.timeZone, utcOffsetMinutes);
              if (ms !== null) onPinTime(ms);
            }}
            className="tabular min-h-12 rounded-xl border border-night-600 bg-night-950 px-3"
          />
          <Button variant="outline" disabled={pinnedAtMs === null} onClick={() => onPinTime(null)}>
            Now
          </Button>
        </div>
        <p className="text-sm text-night-300">Only on this phone: a chosen time does not change what others see.</p>
      </div>

      {message ? (
        <p role={message.tone === "error" ? "alert" : "status"} className={cn("font-bold", message.tone === "error" ? "text-ember-300" : "text-night-200")}>
          {message.text}
        </p>
      ) : null}
    </section>
  );
}
