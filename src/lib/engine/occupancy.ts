/**
 * Occupancy and CO2 generation: Persily & de Jonge (2017) Table 4 as data, interpolation in met,
 * the gas-temperature correction, and the timetable's occupancy per segment.
 */
import { EngineInputError } from './errors';
import type { AgeGroup, GenerationRow } from './types';

/** Met levels of the Table 4 columns. */
export const TABLE_4_METS = [1.0, 1.2, 1.4, 1.6, 2.0, 3.0, 4.0] as const;

/**
 * Persily & de Jonge (2017), Indoor Air 27(5):868–879, Table 4: CO2 generation, L/s at 273 K and
 * ~101 kPa, for the age bands a school holds (adults: 30 to <40). Status confirmed (two public transcriptions of the table agree).
 */
export const GENERATION_TABLE_4: GenerationRow[] = [
  {
    ageGroup: 'early_years',
    sex: 'M',
    ages: '3 to <6',
    lpsByMet: [0.0019, 0.0023, 0.0026, 0.003, 0.0038, 0.0057, 0.0075],
  },
  {
    ageGroup: 'early_years',
    sex: 'F',
    ages: '3 to <6',
    lpsByMet: [0.0017, 0.0021, 0.0024, 0.0028, 0.0035, 0.0052, 0.007],
  },
  { ageGroup: 'primary', sex: 'M', ages: '6 to <11', lpsByMet: [0.0025, 0.003, 0.0035, 0.004, 0.005, 0.0075, 0.01] },
  {
    ageGroup: 'primary',
    sex: 'F',
    ages: '6 to <11',
    lpsByMet: [0.0023, 0.0027, 0.0032, 0.0037, 0.0046, 0.0069, 0.0092],
  },
  {
    ageGroup: 'secondary',
    sex: 'M',
    ages: '11 to <16',
    lpsByMet: [0.0034, 0.0041, 0.0048, 0.0054, 0.0068, 0.0102, 0.0136],
  },
  {
    ageGroup: 'secondary',
    sex: 'F',
    ages: '11 to <16',
    lpsByMet: [0.0029, 0.0035, 0.0041, 0.0047, 0.0058, 0.0088, 0.0117],
  },
  {
    ageGroup: 'sixth_form',
    sex: 'M',
    ages: '16 to <21',
    lpsByMet: [0.0037, 0.0045, 0.0053, 0.006, 0.0075, 0.0113, 0.015],
  },
  {
    ageGroup: 'sixth_form',
    sex: 'F',
    ages: '16 to <21',
    lpsByMet: [0.0029, 0.0036, 0.0042, 0.0047, 0.0059, 0.0089, 0.0119],
  },
  {
    ageGroup: 'adult',
    sex: 'M',
    ages: '30 to <40',
    lpsByMet: [0.0037, 0.0046, 0.0053, 0.0061, 0.0076, 0.0114, 0.0152],
  },
  {
    ageGroup: 'adult',
    sex: 'F',
    ages: '30 to <40',
    lpsByMet: [0.0029, 0.0035, 0.0041, 0.0047, 0.0059, 0.0088, 0.0118],
  },
];

/**
 * Mixed-sex CO2 generation per person, L/s at 273 K: the simple mean of the M and F rows of Table 4,
 * interpolated linearly in met (generation is proportional to met in Persily's equation).
 * met: 1.0–4.0 (the table's range; outside throws).
 */
export function generationPerPersonLps(table: readonly GenerationRow[], ageGroup: AgeGroup, met: number): number {
  if (!(met >= 1 && met <= 4))
    throw new EngineInputError('met', `must be between 1.0 and 4.0 met (Table 4 range), got ${met}`);
  let sum = 0;
  let rows = 0;
  for (const row of table) {
    if (row.ageGroup !== ageGroup) continue;
    sum += interpolateMet(row.lpsByMet, met);
    rows += 1;
  }
  if (rows === 0) throw new EngineInputError('ageGroup', `no CO2 generation rows for ${ageGroup}`);
  return sum / rows;
}

function interpolateMet(values: GenerationRow['lpsByMet'], met: number): number {
  for (let i = 1; i < TABLE_4_METS.length; i++) {
    const hi = TABLE_4_METS[i] as number;
    if (met <= hi + 1e-12) {
      const lo = TABLE_4_METS[i - 1] as number;
      const vLo = values[i - 1] as number;
      const vHi = values[i] as number;
      return vLo + ((vHi - vLo) * (met - lo)) / (hi - lo);
    }
  }
  return values[values.length - 1] as number;
}

/**
 * Persily & de Jonge (2017) equation: V_CO2 [L/s] = RQ · BMR [MJ/day] · M [met] · (T [K] / P [kPa]) · 0.000211.
 * RQ ≈ 0.85; BMR 1–15 MJ/day; M 1–4 met; T in K, P in kPa.
 */
export function persilyGenerationLps(args: {
  rq: number;
  bmrMjPerDay: number;
  met: number;
  tempK: number;
  pressureKpa: number;
}): number {
  return args.rq * args.bmrMjPerDay * args.met * (args.tempK / args.pressureKpa) * 0.000211;
}

/**
 * Legacy body-surface formula (ASHRAE Fundamentals physiology chapter, as quoted by Persily & de Jonge 2017):
 * V_CO2 [L/s] = RQ · 0.00276 · A_D · M / (0.23·RQ + 0.77), RQ = 0.83; A_D DuBois area m².
 */
export function legacyGenerationLps(args: { rq: number; bodySurfaceM2: number; met: number }): number {
  return (args.rq * 0.00276 * args.bodySurfaceM2 * args.met) / (0.23 * args.rq + 0.77);
}

/** DuBois body surface area, m²: A_D = 0.202 · m^0.425 · h^0.725 (mass kg, height m). */
export function duBoisAreaM2(massKg: number, heightM: number): number {
  return 0.202 * massKg ** 0.425 * heightM ** 0.725;
}

/**
 * Gas-temperature correction of Table 4 rates (tabulated at 0 °C) to room air (ideal gas law; the table is at 273 K, 101 kPa):
 * G_room = G_table · (273.15 + θ_room)/273.15 · (101.325 / p_kPa). θ_room −20–50 °C, p 80–110 kPa.
 */
export function generationAtRoomLps(args: { tableLps: number; roomTempC: number; pressureKpa: number }): number {
  return args.tableLps * ((273.15 + args.roomTempC) / 273.15) * (101.325 / args.pressureKpa);
}
