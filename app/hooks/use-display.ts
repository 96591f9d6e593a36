/**
 * The person's units and clock, with the rig's time zone: what every screen formats with.
 * They come from the root's data (who is signed in); a guest of the app gets the defaults.
 */
import { useMemo } from "react";
import { useRouteLoaderData } from "react-router";
import type { Clock, TimeSettings } from "~/lib/datetime";
import { phoneTimeZone } from "~/lib/datetime";
import { defaultUnits, type UnitPrefs } from "~/lib/units";

type RootData = { display?: (UnitPrefs & { clock: Clock }) | null };

export type Display = { units: UnitPrefs; time: TimeSettings };

export function useDisplay(timeZone?: string | null): Display {
  const root = useRouteLoaderData("root") as RootData | undefined;
  const d = root?.display;
  const lengthUnit = d?.lengthUnit ?? defaultUnits.lengthUnit;
  const cableUnit = d?.cableUnit ?? defaultUnits.cableUnit;
  const temperatureUnit = d?.temperatureUnit ?? defaultUnits.temperatureUnit;
  const clock = d?.clock ?? "24h";
  const zone = timeZone || phoneTimeZone();
  return useMemo(() => ({ units: { lengthUnit, cableUnit, temperatureUnit }, time: { timeZone: zone, clock } }), [lengthUnit, cableUnit, temperatureUnit, clock, zone]);
}
