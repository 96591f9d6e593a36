/**
 * Sun position, irradiance and solar harvest.
 *
 * Sun position: Meeus, "Astronomical Algorithms" (2nd ed.), ch. 25 low-accuracy solar
 * coordinates with the ch. 22 low-accuracy nutation, apparent sidereal time (ch. 12), then the
 * topocentric parallax and the atmospheric refraction of the NREL SPA (Reda & Andreas 2008,
 * eqs. 37–44). Chosen by measurement (see solar.test.ts): within 0.01° of the SPA worked
 * example and of astronomy-engine over 1,000 random places and times, at a small fraction
 * of a library's bundle size.
 *
 * Irradiance: Spencer's extraterrestrial series, the Haurwitz clear-sky GHI, the Erbs
 * diffuse fraction, the isotropic-sky (Liu–Jordan) plane-of-array transposition.
 * Array output: Wp × POA/1000 × temperature derating × PVWatts v5 losses × controller.
 */
import type { SolarSource } from "./model";
import { how, r, type How } from "./explain";
import { clamp, DEG } from "./units";

/* ---------------------------------------------------------------- time */

/** Julian Day (UT) from Unix milliseconds. */
export function julianDay(ms: number): number {
  return ms / 86400000 + 2440587.5;
}

/**
 * ΔT = TT − UT in seconds, polynomial estimates of Espenak & Meeus (NASA, 2006; secondary).
 * Used when the caller gives none; 1 s of ΔT moves the sun by about 0.004°.
 */
export function estimateDeltaTSeconds(ms: number): number {
  const d = new Date(ms);
  const y = d.getUTCFullYear() + (d.getUTCMonth() + 0.5) / 12;
  if (y >= 2005 && y < 2050) {
    const t = y - 2000;
    return 62.92 + 0.32217 * t + 0.005589 * t * t;
  }
  if (y >= 1986 && y < 2005) {
    const t = y - 2000;
    return 63.86 + 0.3345 * t - 0.060374 * t ** 2 + 0.0017275 * t ** 3 + 0.000651814 * t ** 4 + 0.00002373599 * t ** 5;
  }
  if (y >= 1961 && y < 1986) {
    const t = y - 1975;
    return 45.45 + 1.067 * t - t ** 2 / 260 - t ** 3 / 718;
  }
  if (y >= 2050 && y < 2150) return -20 + 32 * ((y - 1820) / 100) ** 2 - 0.5628 * (2150 - y);
  const u = (y - 1820) / 100;
  return -20 + 32 * u * u;
}

/* -------------------------------------------------------- sun position */

export interface SunPositionOptions {
  elevationM?: number;
  /** Annual average local pressure and temperature for refraction (SPA defaults 1010 mbar, 10 °C). */
  pressureMbar?: number;
  temperatureC?: number;
  deltaTSeconds?: number;
  /** Apply atmospheric refraction (default true). */
  refraction?: boolean;
}

export interface SunPosition {
  /** Topocentric zenith angle, refraction-corrected unless disabled. */
  zenithDeg: number;
  /** Topocentric azimuth, eastward from north (0 = N, 90 = E, 180 = S). */
  azimuthDeg: number;
  elevationDeg: number;
  /** Geocentric apparent right ascension and declination. */
  rightAscensionDeg: number;
  declinationDeg: number;
  /** Earth–Sun distance in astronomical units. */
  distanceAu: number;
  julianDay: number;
}

const norm360 = (x: number): number => ((x % 360) + 360) % 360;

/** The slowly varying part of the sun's apparent position (geocentric, of date). */
export interface SunCoordinates {
  /** Apparent right ascension and declination, radians. */
  alphaRad: number;
  deltaRad: number;
  /** Earth–Sun distance, AU. */
  distanceAu: number;
  /** Equation of the equinoxes Δψ·cos ε, degrees (mean → apparent sidereal time). */
  eqEquinoxDeg: number;
}

export function sunCoordinates(ms: number, deltaTSeconds?: number): SunCoordinates {
  const jd = julianDay(ms);
  const dT = deltaTSeconds ?? estimateDeltaTSeconds(ms);
  const T = (jd + dT / 86400 - 2451545) / 36525;

  // Meeus 25.2–25.5: geometric mean longitude, mean anomaly, eccentricity, equation of centre.
  const L0 = norm360(280.46646 + 36000.76983 * T + 0.0003032 * T * T);
  const M = 357.52911 + 35999.05029 * T - 0.0001537 * T * T;
  const Mr = M * DEG;
  const e = 0.016708634 - 0.000042037 * T - 0.0000001267 * T * T;
  const C =
    (1.914602 - 0.004817 * T - 0.000014 * T * T) * Math.sin(Mr) +
    (0.019993 - 0.000101 * T) * Math.sin(2 * Mr) +
    0.000289 * Math.sin(3 * Mr);
  const trueLon = L0 + C;
  const nu = (M + C) * DEG;
  const R = (1.000001018 * (1 - e * e)) / (1 + e * Math.cos(nu));

  // Meeus ch. 22 low-accuracy nutation and mean obliquity (22.2).
  const omega = (125.04452 - 1934.136261 * T + 0.0020708 * T * T + (T * T * T) / 450000) * DEG;
  const Lsun = (280.4665 + 36000.7698 * T) * DEG;
  const Lmoon = (218.3165 + 481267.8813 * T) * DEG;
  const dPsi = (-17.2 * Math.sin(omega) - 1.32 * Math.sin(2 * Lsun) - 0.23 * Math.sin(2 * Lmoon) + 0.21 * Math.sin(2 * omega)) / 3600;
  const dEps = (9.2 * Math.cos(omega) + 0.57 * Math.cos(2 * Lsun) + 0.1 * Math.cos(2 * Lmoon) - 0.09 * Math.cos(2 * omega)) / 3600;
  const eps0 = 23 + 26 / 60 + (21.448 - 46.815 * T - 0.00059 * T * T + 0.001813 * T * T * T) / 3600;
  const eps = (eps0 + dEps) * DEG;

  // Apparent longitude: nutation in longitude and aberration (−20.4898″ / R).
  const lambda = (trueLon + dPsi - 20.4898 / 3600 / R) * DEG;
  return {
    alphaRad: Math.atan2(Math.cos(eps) * Math.sin(lambda), Math.cos(lambda)),
    deltaRad: Math.asin(Math.sin(eps) * Math.sin(lambda)),
    distanceAu: R,
    eqEquinoxDeg: dPsi * Math.cos(eps),
  };
}

/**
 * Linear interpolation of two coordinate sets a fraction f of the way (RA unwrapped).
 * Writes into `out` when given (no allocation in the projection's inner loop).
 */
export function interpolateSunCoordinates(a: SunCoordinates, b: SunCoordinates, f: number, out?: SunCoordinates): SunCoordinates {
  let dA = b.alphaRad - a.alphaRad;
  if (dA > Math.PI) dA -= 2 * Math.PI;
  else if (dA < -Math.PI) dA += 2 * Math.PI;
  const o = out ?? { alphaRad: 0, deltaRad: 0, distanceAu: 0, eqEquinoxDeg: 0 };
  o.alphaRad = a.alphaRad + dA * f;
  o.deltaRad = a.deltaRad + (b.deltaRad - a.deltaRad) * f;
  o.distanceAu = a.distanceAu + (b.distanceAu - a.distanceAu) * f;
  o.eqEquinoxDeg = a.eqEquinoxDeg + (b.eqEquinoxDeg - a.eqEquinoxDeg) * f;
  return o;
}

/** Topocentric horizon position from the sun's coordinates at an instant. */
export function sunHorizontal(c: SunCoordinates, ms: number, latDeg: number, lonDeg: number, opts: SunPositionOptions = {}): SunPosition {
  const jd = julianDay(ms);
  const alpha = c.alphaRad;
  const delta = c.deltaRad;
  const R = c.distanceAu;
  // Apparent sidereal time at Greenwich (Meeus 12.4 + equation of the equinoxes).
  const Tu = (jd - 2451545) / 36525;
  const theta0 = 280.46061837 + 360.98564736629 * (jd - 2451545) + 0.000387933 * Tu * Tu - (Tu * Tu * Tu) / 38710000;
  const H = norm360(theta0 + c.eqEquinoxDeg + lonDeg - alpha / DEG) * DEG;

  // Topocentric correction (SPA eqs. 37–42).
  const phi = latDeg * DEG;
  const xi = (8.794 / 3600 / R) * DEG;
  const u = Math.atan(0.99664719 * Math.tan(phi));
  const h = opts.elevationM ?? 0;
  const x = Math.cos(u) + (h / 6378140) * Math.cos(phi);
  const y = 0.99664719 * Math.sin(u) + (h / 6378140) * Math.sin(phi);
  const sinXi = Math.sin(xi);
  const cosH = Math.cos(H);
  const cosD = Math.cos(delta);
  const dAlpha = Math.atan2(-x * sinXi * Math.sin(H), cosD - x * sinXi * cosH);
  const deltaP = Math.atan2((Math.sin(delta) - y * sinXi) * Math.cos(dAlpha), cosD - x * sinXi * cosH);
  const Hp = H - dAlpha;

  // Elevation, refraction (SPA eqs. 41–44), azimuth (eqs. 45–46).
  const sinPhi = Math.sin(phi);
  const cosPhi = Math.cos(phi);
  const cosHp = Math.cos(Hp);
  const e0 = Math.asin(sinPhi * Math.sin(deltaP) + cosPhi * Math.cos(deltaP) * cosHp) / DEG;
  const P = opts.pressureMbar ?? 1010;
  const Tc = opts.temperatureC ?? 10;
  const refr = opts.refraction === false || e0 < -0.26667 - 0.5667
    ? 0
    : (P / 1010) * (283 / (273 + Tc)) * (1.02 / (60 * Math.tan((e0 + 10.3 / (e0 + 5.11)) * DEG)));
  const elev = e0 + refr;
  const gamma = Math.atan2(Math.sin(Hp), cosHp * sinPhi - Math.tan(deltaP) * cosPhi) / DEG;
  return {
    zenithDeg: 90 - elev,
    azimuthDeg: norm360(gamma + 180),
    elevationDeg: elev,
    rightAscensionDeg: norm360(alpha / DEG),
    declinationDeg: delta / DEG,
    distanceAu: R,
    julianDay: jd,
  };
}

export function sunPosition(ms: number, latDeg: number, lonDeg: number, opts: SunPositionOptions = {}): SunPosition {
  return sunHorizontal(sunCoordinates(ms, opts.deltaTSeconds), ms, latDeg, lonDeg, opts);
}

/* ------------------------------------------------------------ irradiance */

export const SOLAR_CONSTANT_W_M2 = 1367;

/** Extraterrestrial normal irradiance, Spencer (1971) series as given by Sandia PVPMC. */
export function extraterrestrialIrradianceWm2(dayOfYear: number): number {
  const b = (2 * Math.PI * dayOfYear) / 365;
  return SOLAR_CONSTANT_W_M2 * (1.00011 + 0.034221 * Math.cos(b) + 0.00128 * Math.sin(b) + 0.000719 * Math.cos(2 * b) + 0.000077 * Math.sin(2 * b));
}

/**
 * Haurwitz clear-sky GHI: 1098 · cos Z · exp(−0.059 / cos Z), Z the apparent zenith.
 * The −0.059 is the constant of SAND2012-2389 as implemented in pvlib (REFERENCES.md had
 * −0.057 from memory; pvlib's test values agree with −0.059, see solar.test.ts).
 */
export function clearSkyGhiWm2(apparentZenithDeg: number): number {
  const cz = Math.cos(apparentZenithDeg * DEG);
  return cz > 0 ? 1098 * cz * Math.exp(-0.059 / cz) : 0;
}

/** Erbs et al. (1982) diffuse fraction of GHI from the clearness index kt. */
export function erbsDiffuseFraction(kt: number): number {
  if (kt <= 0.22) return 1 - 0.09 * kt;
  if (kt <= 0.8) return 0.9511 - 0.1604 * kt + 4.388 * kt ** 2 - 16.638 * kt ** 3 + 12.336 * kt ** 4;
  return 0.165;
}

/** Cosine of the angle of incidence on a plane of given tilt and compass azimuth. */
export function cosIncidence(zenithDeg: number, sunAzimuthDeg: number, tiltDeg: number, planeAzimuthDeg: number): number {
  const z = zenithDeg * DEG;
  const t = tiltDeg * DEG;
  return Math.cos(z) * Math.cos(t) + Math.sin(z) * Math.sin(t) * Math.cos((sunAzimuthDeg - planeAzimuthDeg) * DEG);
}

export interface IrradianceResult {
  ghiWm2: number;
  dniWm2: number;
  dhiWm2: number;
  poaWm2: number;
}

/** Clear-sky GHI split into beam and diffuse (Haurwitz + Erbs), before any weather factor. */
export function clearSkyComponents(zenithDeg: number, extraterrestrialWm2: number): { ghiWm2: number; dniWm2: number; dhiWm2: number } {
  if (zenithDeg >= 90) return { ghiWm2: 0, dniWm2: 0, dhiWm2: 0 };
  const cz = Math.cos(zenithDeg * DEG);
  const ghi = clearSkyGhiWm2(zenithDeg);
  const kt = clamp(ghi / (extraterrestrialWm2 * Math.max(cz, 0.065)), 0, 1);
  const dhi = ghi * erbsDiffuseFraction(kt);
  const dni = cz > 0.02 ? Math.max(0, (ghi - dhi) / cz) : 0;
  return { ghiWm2: ghi, dniWm2: dni, dhiWm2: dhi };
}

/** Isotropic-sky transposition of given components onto a plane, W/m². */
export function transposeWm2(c: { ghiWm2: number; dniWm2: number; dhiWm2: number }, zenithDeg: number, sunAzimuthDeg: number, tiltDeg: number, azimuthDeg: number, albedo = 0.2): number {
  const ct = Math.max(0, cosIncidence(zenithDeg, sunAzimuthDeg, tiltDeg, azimuthDeg));
  const cb = Math.cos(tiltDeg * DEG);
  return Math.max(0, c.dniWm2 * ct + (c.dhiWm2 * (1 + cb)) / 2 + (c.ghiWm2 * albedo * (1 - cb)) / 2);
}

/**
 * Plane-of-array irradiance, isotropic sky: POA = DNI·cos θ + DHI·(1 + cos β)/2 + GHI·ρ·(1 − cos β)/2,
 * from the clear-sky GHI split with Erbs. The weather factor (0–1) then scales every
 * component: a planning factor on the clear sky, chosen so that more sun can never mean less
 * power on any panel (splitting a dimmed GHI with Erbs would not guarantee that).
 */
export function planeOfArrayWm2(sun: SunPosition, dayOfYear: number, tiltDeg: number, azimuthDeg: number, weatherFactor = 1, albedo = 0.2): IrradianceResult {
  if (sun.zenithDeg >= 90) return { ghiWm2: 0, dniWm2: 0, dhiWm2: 0, poaWm2: 0 };
  const wf = clamp(weatherFactor, 0, 1);
  const c = clearSkyComponents(sun.zenithDeg, extraterrestrialIrradianceWm2(dayOfYear));
  const poa = transposeWm2(c, sun.zenithDeg, sun.azimuthDeg, tiltDeg, azimuthDeg, albedo);
  return { ghiWm2: c.ghiWm2 * wf, dniWm2: c.dniWm2 * wf, dhiWm2: c.dhiWm2 * wf, poaWm2: poa * wf };
}

/* ------------------------------------------------------------- array */

/** PVWatts v5 default losses in % (Dobos 2014, NREL). */
export const PVWATTS_DEFAULT_LOSSES_PCT = {
  soiling: 2, shading: 3, snow: 0, mismatch: 2, wiring: 2, connections: 0.5,
  lightInducedDegradation: 1.5, nameplate: 1, age: 0, availability: 3,
} as const;

/** Combined multiplicatively: 100 · (1 − Π(1 − l/100)). */
export function combinedLossesPct(losses: Record<string, number>): number {
  let keep = 1;
  for (const l of Object.values(losses)) keep *= 1 - l / 100;
  return 100 * (1 - keep);
}

export const DEFAULT_LOSSES_PCT = combinedLossesPct(PVWATTS_DEFAULT_LOSSES_PCT);

/** Common practice: MPPT conversion about 97 %; PWM holds the panel at battery voltage,
 * delivering about 75 % of MPP power from a 36-cell "12 V" panel (memory). */
export const MPPT_EFFICIENCY = 0.97;
export const PWM_FACTOR = 0.75;
/** Cell temperature rise over ambient per W/m² for panels mounted close to a roof:
 * NOCT-style (NOCT − 20)/800 with NOCT 48 °C (common practice for flush mounts). */
export const CELL_RISE_C_PER_WM2 = (48 - 20) / 800;

export interface ArrayOutput {
  /** Power into the bank. */
  outW: number;
  poaWm2: number;
  cellTempC: number;
}

/** Output of a solar array into the bank for a plane-of-array irradiance. */
export function arrayOutputW(src: SolarSource, poaWm2: number, ambientC: number, bankV: number): ArrayOutput {
  if (poaWm2 <= 0) return { outW: 0, poaWm2: 0, cellTempC: ambientC };
  return { outW: arrayPowerW(src, poaWm2, ambientC, bankV), poaWm2, cellTempC: ambientC + CELL_RISE_C_PER_WM2 * poaWm2 };
}

/** The same as arrayOutputW(...).outW, without allocating. */
export function arrayPowerW(src: SolarSource, poaWm2: number, ambientC: number, bankV: number): number {
  if (poaWm2 <= 0) return 0;
  const cellTempC = ambientC + CELL_RISE_C_PER_WM2 * poaWm2;
  const losses = (src.lossesPct ?? DEFAULT_LOSSES_PCT) / 100;
  const gamma = (src.tempCoeffPctPerC ?? -0.37) / 100;
  let w = src.peakW * (poaWm2 / 1000) * (1 - losses);
  if (src.controller === "mppt") w *= (1 + gamma * (cellTempC - 25)) * MPPT_EFFICIENCY;
  else w *= PWM_FACTOR;
  const cap = src.maxChargeA !== undefined ? src.maxChargeA * bankV : Number.POSITIVE_INFINITY;
  return Math.max(0, Math.min(w, cap));
}

export function arrayHow(src: SolarSource): How {
  return how(
    src.controller === "mppt"
      ? "P = Wp × POA/1000 × (1 − losses) × (1 + γ(T_cell − 25)) × η_MPPT, capped at the controller limit"
      : "P = Wp × POA/1000 × (1 − losses) × PWM factor, capped at the controller limit",
    {
      peakW: src.peakW, tiltDeg: src.tiltDeg, azimuthDeg: src.azimuthDeg, lossesPct: r(src.lossesPct ?? DEFAULT_LOSSES_PCT, 2),
      tempCoeffPctPerC: src.tempCoeffPctPerC ?? -0.37, controller: src.controller,
    },
    "Clear sky: Haurwitz GHI, Erbs split, isotropic sky on the panel plane; losses default to PVWatts v5 (14.08 %).",
  );
}

/* --------------------------------------------------------- local days */

/** UTC offset of an IANA time zone at an instant, in minutes (east positive). */
export function utcOffsetMinutes(ms: number, timeZone: string): number {
  const parts = offsetFormatter(timeZone).formatToParts(new Date(ms));
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value ?? 0);
  const asUtc = Date.UTC(get("year"), get("month") - 1, get("day"), get("hour") % 24, get("minute"), get("second"));
  return Math.round((asUtc - Math.floor(ms / 1000) * 1000) / 60000);
}

const formatters = new Map<string, Intl.DateTimeFormat>();
function offsetFormatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone, hourCycle: "h23", year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", second: "2-digit",
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** Unix ms of local midnight starting a date ("YYYY-MM-DD") in a time zone. */
export function localMidnightMs(date: string, timeZone: string): number {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  const guess = Date.UTC(y, m - 1, d);
  const off1 = utcOffsetMinutes(guess, timeZone);
  const t = guess - off1 * 60000;
  const off2 = utcOffsetMinutes(t, timeZone);
  return guess - off2 * 60000;
}

export function dayOfYear(ms: number): number {
  const d = new Date(ms);
  return Math.floor((Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()) - Date.UTC(d.getUTCFullYear(), 0, 0)) / 86400000);
}

/* ------------------------------------------------------- day harvest */

export interface SunEvents {
  /** Unix ms, or null when the sun does not rise or set that day (polar day/night). */
  sunriseMs: number | null;
  sunsetMs: number | null;
  solarNoonMs: number;
}

/**
 * Sunrise and sunset: the instants the sun's centre stands at −0.833° (refraction 34′ plus
 * the half-diameter 16′, the usual almanac convention), searched from local midnight to
 * midnight and refined by bisection to about one second.
 */
export function sunEvents(fromMs: number, toMs: number, latDeg: number, lonDeg: number): SunEvents {
  const alt = (t: number) => sunPosition(t, latDeg, lonDeg, { refraction: false }).elevationDeg + 0.833;
  const step = 10 * 60000;
  let sunriseMs: number | null = null;
  let sunsetMs: number | null = null;
  let noon = fromMs;
  let best = -Infinity;
  let prevT = fromMs;
  let prev = alt(prevT);
  for (let t = fromMs + step; t <= toMs; t += step) {
    const a = alt(t);
    if (a > best) { best = a; noon = t; }
    if (sunriseMs === null && prev < 0 && a >= 0) sunriseMs = bisect(alt, prevT, t);
    if (sunsetMs === null && prev >= 0 && a < 0) sunsetMs = bisect(alt, prevT, t);
    prev = a;
    prevT = t;
  }
  return { sunriseMs, sunsetMs, solarNoonMs: noon };
}

function bisect(f: (t: number) => number, lo: number, hi: number): number {
  const sLo = Math.sign(f(lo));
  for (let i = 0; i < 20 && hi - lo > 1000; i++) {
    const mid = (lo + hi) / 2;
    if (Math.sign(f(mid)) === sLo) lo = mid;
    else hi = mid;
  }
  return Math.round((lo + hi) / 2);
}

export interface DayHarvest {
  date: string;
  /** Local hour 0–23 → Wh into the bank (and plane-of-array Wh/m²). */
  hourly: { hour: number; wh: number; poaWhM2: number }[];
  whPerDay: number;
  /** Plane-of-array insolation / 1 kW/m². */
  peakSunHours: number;
  sunriseMs: number | null;
  sunsetMs: number | null;
  how: How;
}

/**
 * Daily harvest of several arrays for a local date, 5-minute integration; the sun's
 * coordinates are computed hourly and interpolated (error < 1e-5°), its horizon position per
 * step. Returns Wh per source and the plane-of-array Wh/m² of each, by local hour.
 */
export function harvestArrays(
  srcs: SolarSource[],
  place: { latDeg: number; lonDeg: number; elevationM?: number; timeZone: string },
  date: string,
  opts: { weatherFactor?: number; ambientC?: number; bankV: number },
): { start: number; end: number; hourlyWh: number[][]; hourlyPoa: number[][] } {
  const start = localMidnightMs(date, place.timeZone);
  const end = localMidnightMs(nextDate(date), place.timeZone);
  const stepMs = 5 * 60000;
  const hourlyWh = srcs.map(() => new Array<number>(24).fill(0));
  const hourlyPoa = srcs.map(() => new Array<number>(24).fill(0));
  const doy = dayOfYear(start + 12 * 3600000);
  const off = utcOffsetMinutes(start + 12 * 3600000, place.timeZone);
  const coords: SunCoordinates[] = [];
  const coordsAt = (h: number) => (coords[h] ??= sunCoordinates(start + h * 3600000));
  const sunOpts = { elevationM: place.elevationM ?? 0 };
  for (let t = start; t < end; t += stepMs) {
    const mid = t + stepMs / 2;
    const hIdx = Math.floor((mid - start) / 3600000);
    const sun = sunHorizontal(interpolateSunCoordinates(coordsAt(hIdx), coordsAt(hIdx + 1), (mid - start) / 3600000 - hIdx), mid, place.latDeg, place.lonDeg, sunOpts);
    if (sun.zenithDeg >= 90) continue;
    const hour = Math.floor(((((mid + off * 60000) / 3600000) % 24) + 24) % 24);
    srcs.forEach((src, i) => {
      const irr = planeOfArrayWm2(sun, doy, src.tiltDeg, src.azimuthDeg, opts.weatherFactor ?? 1);
      const out = arrayOutputW(src, irr.poaWm2, opts.ambientC ?? 20, opts.bankV);
      hourlyWh[i]![hour]! += out.outW / 12;
      hourlyPoa[i]![hour]! += irr.poaWm2 / 12;
    });
  }
  return { start, end, hourlyWh, hourlyPoa };
}

/** Hourly and daily harvest of one array for a local date, 5-minute integration. */
export function dayHarvest(
  src: SolarSource,
  place: { latDeg: number; lonDeg: number; elevationM?: number; timeZone: string },
  date: string,
  opts: { weatherFactor?: number; ambientC?: number; bankV: number },
): DayHarvest {
  const h = harvestArrays([src], place, date, opts);
  const hourly = h.hourlyWh[0]!.map((wh, hour) => ({ hour, wh, poaWhM2: h.hourlyPoa[0]![hour]! }));
  const whPerDay = hourly.reduce((s, x) => s + x.wh, 0);
  const poaWhM2 = hourly.reduce((s, x) => s + x.poaWhM2, 0);
  const ev = sunEvents(h.start, h.end, place.latDeg, place.lonDeg);
  return {
    date,
    hourly,
    whPerDay,
    peakSunHours: poaWhM2 / 1000,
    sunriseMs: ev.sunriseMs,
    sunsetMs: ev.sunsetMs,
    how: how("Wh/day = Σ over 5-min steps of P(t) × 5/60 h; peak sun hours = Σ POA(t) × Δt / 1000 W/m²", {
      latDeg: place.latDeg, lonDeg: place.lonDeg, date, weatherFactor: opts.weatherFactor ?? 1, ambientC: opts.ambientC ?? 20,
    }, arrayHow(src).formula),
  };
}

export function nextDate(date: string): string {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  return new Date(Date.UTC(y, m - 1, d + 1)).toISOString().slice(0, 10);
}
