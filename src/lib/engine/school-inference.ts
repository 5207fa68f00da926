/**
 * What a school's name and postcode say about its phase and climate region, for schools a register names but does
 * not describe. A guess is only made where the words leave no doubt; otherwise the answer is null and the person is
 * asked (or the trust's usual value is used, with a warning).
 */
import type { ClimateRegion, SchoolPhase } from './vocabulary';

/** A phase read from a school's name, with the words that gave it away. */
export interface PhaseGuess {
  phase: SchoolPhase;
  /** The words of the name the guess rests on, as written ("High School"). */
  because: string;
}

// Order matters: the first rule whose words appear wins. Sources: the school types of the Department for Education's
// "Get Information about Schools" register (phase of education: nursery, primary, middle deemed primary/secondary,
// secondary, 16 plus, all-through; special schools and pupil referral units as establishment types) — common practice,
// no single source for the naming habits themselves.
const PHASE_RULES: { phase: SchoolPhase; words: RegExp }[] = [
  { phase: 'all_through', words: /\b(all[- ]?through|through school)\b/i },
  { phase: 'special', words: /\b(special (school|academy)|pupil referral unit|PRU)\b/i },
  // A secondary school "and Sixth Form" is a secondary school; a sixth form college or centre stands alone.
  { phase: 'secondary', words: /\b(high school|secondary|grammar school|upper school|school and sixth form)\b/i },
  { phase: 'further_education', words: /\b(sixth form college|sixth form centre|further education college)\b/i },
  { phase: 'secondary', words: /\bsixth form\b/i },
  { phase: 'primary', words: /\b(primary|infants?|juniors?|first school|lower school)\b/i },
  { phase: 'nursery', words: /\b(nursery( school)?|early years centre)\b/i },
];

/** The phase a school's name states ("Oakfield Primary Academy" → primary), or null when it does not say. */
export function phaseFromName(name: string): PhaseGuess | null {
  for (const rule of PHASE_RULES) {
    const found = rule.words.exec(name);
    if (found) return { phase: rule.phase, because: found[0] };
  }
  return null;
}

/**
 * Postcode areas (the letters before the first digit) by the climate region holding most of each area. Royal Mail
 * postcode areas assigned to the English regions and the nations — from memory: areas that straddle a boundary
 * (SY, PE, LN, HR, CH) go to the region of their main town.
 */
const REGION_BY_AREA: Record<ClimateRegion, readonly string[]> = {
  london_south_east: [
    'E',
    'EC',
    'N',
    'NW',
    'SE',
    'SW',
    'W',
    'WC',
    'BR',
    'CR',
    'DA',
    'EN',
    'HA',
    'IG',
    'KT',
    'RM',
    'SM',
    'TW',
    'UB',
    'WD',
    'BN',
    'CT',
    'GU',
    'ME',
    'RH',
    'TN',
    'MK',
    'OX',
    'RG',
    'SL',
    'HP',
    'PO',
    'SO',
  ],
  east_anglia: ['CB', 'CM', 'CO', 'IP', 'NR', 'PE', 'SS', 'AL', 'SG', 'LU'],
  south_west: ['BA', 'BH', 'BS', 'DT', 'EX', 'GL', 'PL', 'SN', 'SP', 'TA', 'TQ', 'TR'],
  midlands: ['B', 'CV', 'DE', 'DY', 'HR', 'LE', 'LN', 'NG', 'NN', 'ST', 'TF', 'WR', 'WS', 'WV', 'SY'],
  north_west: ['BB', 'BL', 'CA', 'CH', 'CW', 'FY', 'L', 'LA', 'M', 'OL', 'PR', 'SK', 'WA', 'WN'],
  north_east: ['BD', 'DH', 'DL', 'DN', 'HD', 'HG', 'HU', 'HX', 'LS', 'NE', 'S', 'SR', 'TS', 'WF', 'YO'],
  wales: ['CF', 'LD', 'LL', 'NP', 'SA'],
  scotland: ['AB', 'DD', 'DG', 'EH', 'FK', 'G', 'HS', 'IV', 'KA', 'KW', 'KY', 'ML', 'PA', 'PH', 'TD', 'ZE'],
  northern_ireland: ['BT'],
};
const AREA_REGION = new Map<string, ClimateRegion>(
  (Object.entries(REGION_BY_AREA) as [ClimateRegion, readonly string[]][]).flatMap(([region, areas]) =>
    areas.map((area) => [area, region] as const),
  ),
);

/** A whole UK postcode anywhere in a text ("… Leeds LS6 2AB"): the area letters, a district, then the inward code. */
const POSTCODE = /\b([A-Z]{1,2})\d[A-Z\d]?\s*\d[A-Z]{2}\b/i;
/** An outward code alone in its cell ("LS6"). */
const OUTWARD_CODE = /^([A-Z]{1,2})\d[A-Z\d]?$/i;

/** A region read from a postcode, with the postcode area it rests on. */
export interface RegionGuess {
  climateRegion: ClimateRegion;
  /** The postcode area, upper case ("LS"). */
  area: string;
}

/** The climate region of the first UK postcode in `text` ("12 Mill Lane, Leeds LS6 2AB" → north_east), or null. */
export function regionFromPostcode(text: string): RegionGuess | null {
  const found = POSTCODE.exec(text) ?? OUTWARD_CODE.exec(text.trim());
  const area = found?.[1]?.toUpperCase();
  const climateRegion = area ? AREA_REGION.get(area) : undefined;
  return area && climateRegion ? { climateRegion, area } : null;
}

/** The first whole UK postcode in `text`, upper case with one space ("leeds ls6 2ab" → "LS6 2AB"), or null. */
export function postcodeIn(text: string | null): string | null {
  const found = text ? POSTCODE.exec(text) : null;
  if (!found) return null;
  const compact = found[0].replace(/\s+/g, '').toUpperCase();
  return `${compact.slice(0, -3)} ${compact.slice(-3)}`;
}
