/**
 * Cables and protection: conductor resistance (tables and resistivity, with temperature
 * correction), round-trip voltage drop, ampacity by size and insulation rating (with the
 * engine-space reduction), protection checks and a suggested size and fuse for a load.
 * Planning aid only: defer to ABYC E-11 / ISO 13297 for boats, NFPA 70 art. 551 or
 * AS/NZS 3001 for vehicles, and to licensed practice.
 */
import type { CableSize } from "./model";
import { awgSizes } from "./model";
import { how, r, type How } from "./explain";

export type AwgSize = (typeof awgSizes)[number];
export type TempRatingC = 60 | 75 | 80 | 90 | 105 | 125 | 200;
export const TEMP_RATINGS: readonly TempRatingC[] = [60, 75, 80, 90, 105, 125, 200];

/** AWG gauge number n (m/0 → 1 − m). */
export function awgNumber(awg: AwgSize): number {
  const m = /^(\d)\/0$/.exec(awg);
  return m ? 1 - Number(m[1]) : Number(awg);
}

/** ASTM B258: d = 0.005 in × 92^((36 − n)/39). */
export function awgDiameterMm(awg: AwgSize): number {
  return 0.005 * 25.4 * Math.pow(92, (36 - awgNumber(awg)) / 39);
}

export function awgCircularMils(awg: AwgSize): number {
  const dMil = 5 * Math.pow(92, (36 - awgNumber(awg)) / 39);
  return dMil * dMil;
}

export function awgAreaMm2(awg: AwgSize): number {
  const d = awgDiameterMm(awg);
  return (Math.PI / 4) * d * d;
}

/**
 * NFPA 70 (NEC) Chapter 9 Table 8, uncoated stranded copper, Ω per 1000 ft at 75 °C
 * (secondary). 3 AWG and 3/0 from memory of the same table.
 */
export const NEC_TABLE8_OHM_PER_KFT_75C: Record<AwgSize, number> = {
  "18": 7.95, "16": 4.99, "14": 3.14, "12": 1.98, "10": 1.24, "8": 0.778, "6": 0.491, "4": 0.308,
  "3": 0.245, "2": 0.194, "1": 0.154, "1/0": 0.122, "2/0": 0.0967, "3/0": 0.0766, "4/0": 0.0608,
};
/** NEC Table 8 note: R2 = R1 [1 + α (T2 − 75)], α = 0.00323 for copper. */
export const NEC_ALPHA_CU = 0.00323;

/**
 * IEC 60228 Table 3, class 5 (flexible) plain copper, maximum Ω/km at 20 °C (secondary;
 * 0.5, 25, 35, 150, 185, 240 mm² from memory of the same table).
 */
export const IEC60228_CLASS5_OHM_PER_KM_20C: readonly (readonly [number, number])[] = [
  [0.5, 39.0], [0.75, 26.0], [1, 19.5], [1.5, 13.3], [2.5, 7.98], [4, 4.95], [6, 3.3], [10, 1.91],
  [16, 1.21], [25, 0.78], [35, 0.554], [50, 0.386], [70, 0.272], [95, 0.206], [120, 0.161],
  [150, 0.129], [185, 0.106], [240, 0.0801],
];

/** IEC 60028 annealed copper, 100 % IACS: ρ20 = 0.017241 Ω·mm²/m, α20 = 0.00393 /K. */
export const RHO_CU_20C = 0.017241;
export const ALPHA_CU_20C = 0.00393;

export function cableAreaMm2(size: CableSize): number {
  return size.unit === "awg" ? awgAreaMm2(size.awg) : size.mm2;
}

export function cableLabel(size: CableSize): string {
  return size.unit === "awg" ? `${size.awg} AWG` : `${size.mm2} mm²`;
}

/** Resistivity method: R = ρ20 (1 + α20 (T − 20)) / A, Ω per metre. */
export function resistanceFromResistivityOhmPerM(areaMm2: number, tempC: number): number {
  return (RHO_CU_20C * (1 + ALPHA_CU_20C * (tempC - 20))) / areaMm2;
}

/**
 * Conductor resistance in Ω per metre at a conductor temperature. Table method: AWG from
 * NEC Table 8 (stranded, 75 °C, corrected with its α); mm² from IEC 60228 class 5 (20 °C,
 * corrected with α20) where the size is listed; resistivity otherwise.
 */
export function conductorResistanceOhmPerM(size: CableSize, tempC: number, method: "table" | "resistivity" = "table"): number {
  if (method === "resistivity") return resistanceFromResistivityOhmPerM(cableAreaMm2(size), tempC);
  if (size.unit === "awg") {
    const r75 = NEC_TABLE8_OHM_PER_KFT_75C[size.awg] / 304.8;
    return r75 * (1 + NEC_ALPHA_CU * (tempC - 75));
  }
  const row = IEC60228_CLASS5_OHM_PER_KM_20C.find(([a]) => Math.abs(a - size.mm2) < 1e-9);
  if (!row) return resistanceFromResistivityOhmPerM(size.mm2, tempC);
  return (row[1] / 1000) * (1 + ALPHA_CU_20C * (tempC - 20));
}

/** Default conductor temperature for voltage drop: 30 °C (a warm cable at moderate load). */
export const DEFAULT_CONDUCTOR_TEMP_C = 30;

export interface VoltageDrop {
  resistanceOhm: number;
  dropV: number;
  dropPct: number;
  limitPct: number;
  ok: boolean;
  how: How;
}

/** Marine practice (ABYC E-11, ISO 10133; secondary): 3 % critical, 10 % other loads. */
export function voltageDropLimitPct(criticality: "critical" | "normal"): number {
  return criticality === "critical" ? 3 : 10;
}

/** Round-trip voltage drop: V = I × R/m × 2 × one-way length. */
export function voltageDrop(size: CableSize, lengthM: number, currentA: number, nominalV: number, criticality: "critical" | "normal", tempC = DEFAULT_CONDUCTOR_TEMP_C): VoltageDrop {
  const rpm = conductorResistanceOhmPerM(size, tempC);
  const resistanceOhm = rpm * 2 * lengthM;
  const dropV = currentA * resistanceOhm;
  const dropPct = (100 * dropV) / nominalV;
  const limitPct = voltageDropLimitPct(criticality);
  return {
    resistanceOhm,
    dropV,
    dropPct,
    limitPct,
    ok: dropPct <= limitPct,
    how: how(
      "V_drop = I × R′ × 2L; % = V_drop / V_nominal × 100",
      { currentA: r(currentA, 2), size: cableLabel(size), lengthOneWayM: lengthM, ohmPerM: r(rpm, 6), conductorC: tempC, nominalV },
      `Limit ${limitPct} % for ${criticality} circuits (ABYC E-11 practice). Resistance: ${size.unit === "awg" ? "NEC Ch. 9 Table 8" : "IEC 60228 class 5"}.`,
    ),
  };
}

/**
 * 33 CFR 183.425 Table 5 (published): allowable amperes outside engine spaces by insulation
 * rating 60/75/80/90/105/125/200 °C. Rows 18, 1, 2/0, 3/0, 4/0 AWG from memory of the table.
 */
export const CFR183_AMPACITY: Partial<Record<AwgSize, readonly [number, number, number, number, number, number, number]>> = {
  "18": [10, 10, 15, 20, 20, 25, 25],
  "16": [15, 15, 20, 25, 25, 30, 35],
  "14": [20, 20, 25, 30, 35, 40, 45],
  "12": [25, 25, 35, 40, 45, 50, 55],
  "10": [40, 40, 50, 55, 60, 70, 70],
  "8": [55, 65, 70, 70, 80, 90, 100],
  "6": [80, 95, 100, 100, 120, 125, 135],
  "4": [105, 125, 130, 135, 160, 170, 180],
  "2": [140, 170, 175, 180, 210, 225, 240],
  "1": [165, 195, 210, 210, 245, 265, 280],
  "1/0": [195, 230, 245, 245, 285, 305, 325],
  "2/0": [225, 265, 285, 285, 330, 355, 380],
  "3/0": [260, 310, 330, 330, 385, 410, 440],
  "4/0": [300, 360, 385, 385, 445, 475, 510],
};

/** Engine-space multipliers by insulation rating (note to the same table; memory). */
export const ENGINE_SPACE_FACTOR: Record<TempRatingC, number> = { 60: 0.58, 75: 0.75, 80: 0.78, 90: 0.82, 105: 0.86, 125: 0.89, 200: 1 };

/**
 * NFPA 70 (NEC) Table 310.16, copper, not more than three current-carrying conductors in a
 * raceway or cable, 30 °C ambient, columns 60/75/90 °C (2023 edition). Rows 14–2 AWG
 * secondary (REFERENCES.md); 18, 16, 3, 1 and 1/0–4/0 from memory of the table (18 and 16
 * are listed only at 90 °C; their 90 °C value is used for every column here).
 */
export const NEC310_16_AMPACITY: Partial<Record<AwgSize, readonly [number, number, number]>> = {
  "18": [14, 14, 14], "16": [18, 18, 18],
  "14": [15, 20, 25], "12": [20, 25, 30], "10": [30, 35, 40], "8": [40, 50, 55], "6": [55, 65, 75],
  "4": [70, 85, 95], "3": [85, 100, 115], "2": [95, 115, 130], "1": [110, 130, 145],
  "1/0": [125, 150, 170], "2/0": [145, 175, 195], "3/0": [165, 200, 225], "4/0": [195, 230, 260],
};

const rowCache = new Map<string, readonly (readonly [number, number])[]>();
/** (area mm², amperes) rows of one column, sorted by area; computed once per column. */
function ampacityRows(standard: string, col: number, table: Partial<Record<AwgSize, readonly number[]>>): readonly (readonly [number, number])[] {
  const key = `${standard}/${col}`;
  let rows = rowCache.get(key);
  if (!rows) {
    rows = (Object.entries(table) as [AwgSize, readonly number[]][])
      .map(([awg, amps]) => [awgAreaMm2(awg), amps[col]!] as const)
      .sort((a, b) => a[0] - b[0]);
    rowCache.set(key, rows);
  }
  return rows;
}

/** Which ampacity table: boats (33 CFR 183.425, also common practice in vans) or NEC 310.16. */
export type AmpacityStandard = "boat" | "nec";

/** Ampacity of a conductor by size and insulation rating; mm² and unlisted AWG sizes by
 * log-log interpolation on conductor area between the listed AWG rows. */
export function ampacityA(size: CableSize, tempRatingC: TempRatingC, engineSpace: boolean, standard: AmpacityStandard = "boat"): { ampacityA: number; how: How } {
  const table: Partial<Record<AwgSize, readonly number[]>> = standard === "nec" ? NEC310_16_AMPACITY : CFR183_AMPACITY;
  // NEC 310.16 has 60/75/90 °C columns; higher ratings use the 90 °C column.
  const col = standard === "nec" ? (tempRatingC <= 60 ? 0 : tempRatingC <= 75 ? 1 : 2) : TEMP_RATINGS.indexOf(tempRatingC);
  const rows = ampacityRows(standard, col, table);
  let base: number;
  const listed = size.unit === "awg" ? table[size.awg] : undefined;
  if (listed) base = listed[col]!;
  else {
    const area = cableAreaMm2(size);
    const la = Math.log(area);
    const first = rows[0]!, last = rows[rows.length - 1]!;
    if (area <= first[0]) base = first[1] * (area / first[0]);
    else if (area >= last[0]) base = last[1] * Math.pow(area / last[0], 0.6);
    else {
      let i = 1;
      while (rows[i]![0] < area) i++;
      const a = rows[i - 1]!, b = rows[i]!;
      const f = (la - Math.log(a[0])) / (Math.log(b[0]) - Math.log(a[0]));
      base = Math.exp(Math.log(a[1]) + f * (Math.log(b[1]) - Math.log(a[1])));
    }
  }
  const factor = engineSpace ? ENGINE_SPACE_FACTOR[tempRatingC] : 1;
  return {
    ampacityA: base * factor,
    how: how(
      "ampacity = table(size, insulation °C) × engine-space factor",
      { size: cableLabel(size), insulationC: tempRatingC, engineSpace, factor, standard },
      standard === "nec"
        ? "NFPA 70 Table 310.16 (copper, ≤ 3 conductors, 30 °C ambient); metric sizes interpolated on area."
        : "33 CFR 183.425 Table 5 (boats, single conductor; ABYC-style tables are common practice in vans too); metric sizes interpolated on area.",
    ),
  };
}

/** NEC 240.4(D) small-conductor limits on the overcurrent device (18 AWG 7 A, 16 AWG 10 A,
 * 14 AWG 15 A, 12 AWG 20 A, 10 AWG 30 A). */
export const NEC_240_4_D: Partial<Record<AwgSize, number>> = { "18": 7, "16": 10, "14": 15, "12": 20, "10": 30 };

export interface ProtectionCheck {
  ratingA: number;
  /** Device rating at least the non-continuous load plus 125 % of the continuous load (NEC 210.20(A)). */
  requiredMinA: number;
  coversLoad: boolean;
  /** Device rating at most the conductor ampacity (NEC 240.4) and the small-conductor limit. */
  maxForConductorA: number;
  protectsConductor: boolean;
  how: How;
}

export function checkProtection(ratingA: number, continuousA: number, nonContinuousA: number, size: CableSize | undefined, conductorAmpacityA: number | undefined): ProtectionCheck {
  const requiredMinA = nonContinuousA + 1.25 * continuousA;
  const small = size?.unit === "awg" ? NEC_240_4_D[size.awg] : undefined;
  const maxForConductorA = Math.min(conductorAmpacityA ?? Number.POSITIVE_INFINITY, small ?? Number.POSITIVE_INFINITY);
  return {
    ratingA,
    requiredMinA,
    coversLoad: ratingA >= requiredMinA - 1e-9,
    maxForConductorA,
    protectsConductor: ratingA <= maxForConductorA + 1e-9,
    how: how(
      "rating ≥ I_noncontinuous + 1.25 × I_continuous and rating ≤ conductor ampacity",
      { ratingA, continuousA: r(continuousA, 2), nonContinuousA: r(nonContinuousA, 2), conductorAmpacityA: conductorAmpacityA === undefined ? "unknown" : r(conductorAmpacityA, 1) },
      "NEC 210.20(A), 240.4 and 240.4(D); ABYC E-11 sizes boat protection similarly. Follow local code.",
    ),
  };
}

export const STANDARD_FUSE_RATINGS_A = [1, 2, 3, 5, 7.5, 10, 15, 20, 25, 30, 35, 40, 50, 60, 70, 80, 100, 125, 150, 175, 200, 225, 250, 300, 350, 400, 500];
export const METRIC_SIZES_MM2 = IEC60228_CLASS5_OHM_PER_KM_20C.map(([a]) => a);

export interface CableSuggestion {
  size: CableSize;
  fuseA: number | null;
  dropPct: number;
  ampacityA: number;
  how: How;
}

/**
 * The smallest conductor (AWG or mm²) whose round-trip drop stays within the limit and whose
 * ampacity carries the load (125 % if continuous), with the smallest standard fuse that
 * covers the load and still protects that conductor.
 */
export function suggestCable(input: {
  currentA: number; lengthM: number; nominalV: number; criticality: "critical" | "normal";
  continuous: boolean; tempRatingC?: TempRatingC; engineSpace?: boolean; unit?: "awg" | "mm2"; standard?: AmpacityStandard;
}): CableSuggestion | null {
  const t = input.tempRatingC ?? 105;
  const need = input.continuous ? 1.25 * input.currentA : input.currentA;
  const sizes: CableSize[] = (input.unit ?? "awg") === "awg"
    ? [...awgSizes].map((awg) => ({ unit: "awg", awg }) as const)
    : METRIC_SIZES_MM2.map((mm2) => ({ unit: "mm2", mm2 }) as const);
  for (const size of sizes) {
    const vd = voltageDrop(size, input.lengthM, input.currentA, input.nominalV, input.criticality);
    const amp = ampacityA(size, t, input.engineSpace ?? false, input.standard ?? "boat").ampacityA;
    if (!vd.ok || amp < need) continue;
    const small = size.unit === "awg" ? NEC_240_4_D[size.awg] : undefined;
    const maxFuse = Math.min(amp, small ?? Number.POSITIVE_INFINITY);
    const fuseA = STANDARD_FUSE_RATINGS_A.find((f) => f >= need - 1e-9 && f <= maxFuse + 1e-9) ?? null;
    if (fuseA === null) continue;
    return {
      size,
      fuseA,
      dropPct: vd.dropPct,
      ampacityA: amp,
      how: how(
        "smallest size with drop ≤ limit and ampacity ≥ design current; smallest standard fuse in [design current, ampacity]",
        { currentA: input.currentA, designA: r(need, 2), lengthOneWayM: input.lengthM, limitPct: vd.limitPct, insulationC: t },
      ),
    };
  }
  return null;
}
