/**
 * CO2 criteria packs as data, and the choice of pack for a room.
 * ESFA (2018) Building Bulletin 101 values via secondary summaries (CIBSE Journal, consultancy notes);
 * EN 16798-1:2019 Annex B categories as CO2 above outdoor.
 */
import type { AppliedCriterion, AssumptionSet, CriteriaPack } from './types';

const BB101 = 'ESFA (2018) Building Bulletin 101, via CIBSE Journal and consultancy summaries';
const CAP_CONFLICT =
  'Sources disagree on the 20-minute cap: CIBSE Journal technical article 2000 ppm (natural); a CIBSE Journal news item and a trade article say 1500 ppm for either system. Resolve against the primary BB101 text.';

/** The criteria packs shipped as defaults. */
export const CRITERIA_PACKS: CriteriaPack[] = [
  {
    id: 'bb101_2018_new_natural',
    name: 'BB101 (2018) new build, natural ventilation',
    family: 'bb101_2018',
    ventilation: 'natural',
    build: 'new_build',
    basis: 'absolute',
    meanLimitPpm: 1500,
    maxLimitPpm: 2000,
    maxMinutesCap: 20,
    source: BB101,
    status: 'secondary',
    flagged: true,
    note: CAP_CONFLICT,
  },
  {
    id: 'bb101_2018_new_mechanical',
    name: 'BB101 (2018) new build, mechanical ventilation',
    family: 'bb101_2018',
    ventilation: 'mechanical',
    build: 'new_build',
    basis: 'absolute',
    meanLimitPpm: 1000,
    maxLimitPpm: 1500,
    maxMinutesCap: 20,
    source: BB101,
    status: 'secondary',
    note: 'Mean < 1000 ppm secondary; 1500 ppm / 20 min from memory.',
  },
  {
    id: 'bb101_2018_refurb_natural',
    name: 'BB101 (2018) refurbishment, natural ventilation',
    family: 'bb101_2018',
    ventilation: 'natural',
    build: 'refurbishment',
    basis: 'absolute',
    meanLimitPpm: 1750,
    maxLimitPpm: 2000,
    maxMinutesCap: 20,
    source: BB101,
    status: 'secondary',
    flagged: true,
    note: `Mean < 1750 ppm secondary; 2000 ppm / 20 min from memory. ${CAP_CONFLICT}`,
  },
  {
    id: 'bb101_2018_refurb_mechanical',
    name: 'BB101 (2018) refurbishment, mechanical or hybrid',
    family: 'bb101_2018',
    ventilation: 'mechanical',
    build: 'refurbishment',
    basis: 'absolute',
    meanLimitPpm: 1350,
    maxLimitPpm: 2000,
    maxMinutesCap: 20,
    source: BB101,
    status: 'from_memory',
    flagged: true,
    note: 'All values from memory; confirm against the primary text.',
  },
  {
    id: 'en16798_cat_I',
    name: 'EN 16798-1 Category I',
    family: 'en16798_1',
    ventilation: 'any',
    build: 'any',
    basis: 'above_outdoor',
    meanLimitPpm: 550,
    maxLimitPpm: null,
    maxMinutesCap: null,
    source: 'EN 16798-1:2019 Annex B, via public research code',
    status: 'secondary',
  },
  {
    id: 'en16798_cat_II',
    name: 'EN 16798-1 Category II',
    family: 'en16798_1',
    ventilation: 'any',
    build: 'any',
    basis: 'above_outdoor',
    meanLimitPpm: 800,
    maxLimitPpm: null,
    maxMinutesCap: null,
    source: 'EN 16798-1:2019 Annex B, via public research code',
    status: 'secondary',
  },
  {
    id: 'en16798_cat_III',
    name: 'EN 16798-1 Category III',
    family: 'en16798_1',
    ventilation: 'any',
    build: 'any',
    basis: 'above_outdoor',
    meanLimitPpm: 1350,
    maxLimitPpm: null,
    maxMinutesCap: null,
    source: 'EN 16798-1:2019 Annex B, via public research code',
    status: 'secondary',
  },
  {
    id: 'en16798_cat_IV',
    name: 'EN 16798-1 Category IV',
    family: 'en16798_1',
    ventilation: 'any',
    build: 'any',
    basis: 'above_outdoor',
    meanLimitPpm: 1350,
    maxLimitPpm: null,
    maxMinutesCap: null,
    source: 'EN 16798-1:2019 Annex B, via public research code',
    status: 'secondary',
    flagged: true,
    note: 'Category IV is "worse than III" (> 1350 ppm above outdoor) with no upper limit; the Category III boundary is used, so IV reports whether the room is within Category III.',
  },
];

/** EN 16798-1:2019 Annex B design outdoor-air rates: person and building components (L/s per person, L/(s·m²)). */
export const EN16798_AIRFLOW = {
  I: { perPersonLps: 10, veryLowPollutingLpsM2: 0.5, lowPollutingLpsM2: 1.0, notLowPollutingLpsM2: 2.0 },
  II: { perPersonLps: 7, veryLowPollutingLpsM2: 0.35, lowPollutingLpsM2: 0.7, notLowPollutingLpsM2: 1.4 },
  III: { perPersonLps: 4, veryLowPollutingLpsM2: 0.2, lowPollutingLpsM2: 0.4, notLowPollutingLpsM2: 0.8 },
  IV: { perPersonLps: 2.5, veryLowPollutingLpsM2: 0.15, lowPollutingLpsM2: 0.3, notLowPollutingLpsM2: 0.6 },
} as const;

/**
 * EN 16798-1:2019 Annex B design outdoor-air rate: q_tot = n·q_p + A·q_B, L/s.
 * n ≥ 0 persons, A > 0 m² floor area.
 */
export function en16798DesignAirflowLps(args: {
  persons: number;
  floorAreaM2: number;
  category: keyof typeof EN16798_AIRFLOW;
  building: 'very_low_polluting' | 'low_polluting' | 'not_low_polluting';
}): number {
  const row = EN16798_AIRFLOW[args.category];
  const qB =
    args.building === 'very_low_polluting'
      ? row.veryLowPollutingLpsM2
      : args.building === 'low_polluting'
        ? row.lowPollutingLpsM2
        : row.notLowPollutingLpsM2;
  return args.persons * row.perPersonLps + args.floorAreaM2 * qB;
}

/** Turn a pack into absolute limits at the given outdoor CO2 (EN packs are "above outdoor"). */
export function applyPack(pack: CriteriaPack, outdoorCo2Ppm: number): AppliedCriterion {
  const offset = pack.basis === 'above_outdoor' ? outdoorCo2Ppm : 0;
  const meanLimitPpm = pack.meanLimitPpm + offset;
  return {
    packId: pack.id,
    packName: pack.name,
    meanLimitPpm,
    maxLimitPpm: pack.maxLimitPpm === null ? null : pack.maxLimitPpm + offset,
    maxMinutesCap: pack.maxMinutesCap,
    riskThresholdPpm: meanLimitPpm,
    flagged: pack.flagged === true,
    note: pack.note ?? null,
  };
}

/** Pick the pack for a room from the assumption set's family, the room's ventilation class and build status. */
export function choosePack(
  assumptions: AssumptionSet,
  ventilation: 'natural' | 'mechanical',
  build: 'new_build' | 'refurbishment',
): CriteriaPack {
  const packs = assumptions.criteria.packs.value;
  const family = assumptions.criteria.family.value;
  const found =
    family === 'en16798_1'
      ? packs.find((p) => p.id === `en16798_cat_${assumptions.criteria.enCategory.value}`)
      : packs.find((p) => p.family === family && p.ventilation === ventilation && p.build === build);
  if (!found) throw new Error(`No criteria pack for ${family}/${ventilation}/${build}`);
  return found;
}

/** Build status of a block for criteria: by year built (null year → existing building) or forced by the set. */
export function buildStatusOf(assumptions: AssumptionSet, yearBuilt: number | null): 'new_build' | 'refurbishment' {
  const choice = assumptions.criteria.buildStatus.value;
  if (choice !== 'by_year_built') return choice;
  return yearBuilt !== null && yearBuilt >= assumptions.criteria.newBuildFromYear.value ? 'new_build' : 'refurbishment';
}
