import { BLOCK_LIMITS } from '../../engine/limits';
import { label } from '../../engine/vocabulary';
import type { Quantity } from './columns';
import { looksLikeFormula } from '../formula-guard';

export { guardFormula } from '../formula-guard';

/** A cell as the readers hand it over: exceljs objects already reduced to a plain value. */
export type CellValue = string | number | boolean | Date | null;

/** The outcome of reading one cell: a value, blank, or a message saying what is wrong. */
export type Parsed<T> = { ok: true; value: T | null; placeholder?: boolean } | { ok: false; message: string };

const blank = <T>(placeholder = false): Parsed<T> => ({
  ok: true,
  value: null,
  ...(placeholder ? { placeholder } : {}),
});
const fail = <T>(message: string): Parsed<T> => ({ ok: false, message });

/** Reduces an exceljs cell value (formula, rich text, hyperlink, error) to a plain value. */
export function plainCellValue(raw: unknown): CellValue {
  if (raw === null || raw === undefined) return null;
  if (typeof raw === 'string' || typeof raw === 'number' || typeof raw === 'boolean' || raw instanceof Date) return raw;
  if (typeof raw === 'object') {
    const o = raw as Record<string, unknown>;
    if ('formula' in o || 'sharedFormula' in o) return plainCellValue(o.result);
    if (Array.isArray(o.richText)) return (o.richText as { text?: string }[]).map((r) => r.text ?? '').join('');
    if ('hyperlink' in o || 'text' in o) return plainCellValue(o.text);
    if ('error' in o) return null;
  }
  return null;
}

/** Trimmed text of a cell, without the quote our export puts before formula-like text. */
export function cellText(value: CellValue): string {
  if (value === null) return '';
  // Every cell of every row comes through here: a number needs no cleaning, a text only the cleaning it needs.
  if (typeof value === 'number') return String(value);
  if (value instanceof Date) return value.toISOString().slice(0, 10);
  let text = String(value);
  if (text.includes('\u00a0')) text = text.replace(/\u00a0/g, ' ');
  text = text.trim();
  return text.startsWith("'") && looksLikeFormula(text.slice(1)) ? text.slice(1).trim() : text;
}

const PLACEHOLDERS = new Set([
  'tbc',
  'tba',
  'tbd',
  'tbconfirmed',
  'tobeconfirmed',
  'na',
  'n/a',
  'unknown',
  'notknown',
  'nk',
  '?',
  '??',
  '-',
  '--',
  '–',
  '—',
  'x',
  'none given',
]);

const PLACEHOLDER_FIRST = new Set([...PLACEHOLDERS].map((p) => p.charAt(0)));

/** True for the "TBC", "n/a", "?" and dash placeholders surveyors leave in unfinished cells. */
export function isPlaceholder(text: string): boolean {
  if (text.length > 20) return false;
  // Every placeholder starts with one of these characters; most cells are ruled out here cheaply.
  if (!PLACEHOLDER_FIRST.has(text.trimStart().charAt(0).toLowerCase())) return false;
  const t = text.toLowerCase().replace(/\s+/g, '');
  return PLACEHOLDERS.has(t) || PLACEHOLDERS.has(text.toLowerCase().trim());
}

/** Reads a free-text cell; blank and placeholders become null. */
export function parseText(value: CellValue): Parsed<string> {
  let text = cellText(value);
  if (/\s\s|[\t\n\r]/.test(text)) text = text.replace(/\s+/g, ' ');
  if (text === '') return blank();
  if (isPlaceholder(text)) return blank(true);
  return { ok: true, value: text };
}

/** Units we accept after a number, per quantity, with the factor to our unit. */
const UNITS: Record<Quantity, Record<string, number>> = {
  area: {
    '': 1,
    m2: 1,
    'm^2': 1,
    sqm: 1,
    'sq m': 1,
    'sq.m': 1,
    'sq. m': 1,
    'sq.m.': 1,
    'square metres': 1,
    'square meters': 1,
    ft2: 0.09290304,
    sqft: 0.09290304,
    'sq ft': 0.09290304,
  },
  length: { '': 1, m: 1, metres: 1, meters: 1, mm: 0.001, cm: 0.01 },
  flow: { '': 1, 'l/s': 1, ls: 1, lps: 1, 'l/sec': 1, 'litres/s': 1, 'm3/h': 1 / 3.6, 'm3/hr': 1 / 3.6 },
  count: { '': 1, pupils: 1, people: 1, persons: 1, adults: 1, staff: 1, pax: 1 },
  price: { '': 1, '£/kwh': 1, 'gbp/kwh': 1, '/kwh': 1, p: 0.01, 'p/kwh': 0.01 },
  ratio: { '': 1 },
  percent: { '': 0.01, '%': 0.01 },
  permeability: {
    '': 1,
    'm3/h.m2': 1,
    'm3/hm2': 1,
    'm3/(h.m2)': 1,
    'm3/h/m2': 1,
    'm3/(h·m2)': 1,
    'm3/h·m2': 1,
    'm3/h.m2 @ 50 pa': 1,
    'm3/h.m2@50pa': 1,
  },
};

function unitKey(unit: string): string {
  return unit.toLowerCase().replace(/²/g, '2').replace(/³/g, '3').replace(/\s+/g, ' ').replace(/\.$/, '').trim();
}

/**
 * The number in text like "60", "60 m2", "2,7", "1,234.5", "2 700 mm"; decimal commas are read as
 * decimals unless the comma groups exactly three digits as thousands.
 */
export function parseNumberText(text: string): { value: number; unit: string } | null {
  const match = /^([-+]?)(\d[\d\s',.]*)(.*)$/.exec(text.replace(/^(approx\.?|circa|c\.|~|≈)\s*/i, '').trim());
  if (!match) return null;
  const sign = match[1] === '-' ? -1 : 1;
  let digits = (match[2] ?? '').replace(/[\s']/g, '');
  const unit = (match[3] ?? '').trim();
  const lastComma = digits.lastIndexOf(',');
  const lastDot = digits.lastIndexOf('.');
  if (lastComma >= 0 && lastDot >= 0) {
    // Both present: the later one is the decimal separator.
    digits = lastComma > lastDot ? digits.replace(/\./g, '').replace(',', '.') : digits.replace(/,/g, '');
  } else if (lastComma >= 0) {
    digits = /^\d{1,3}(,\d{3})+$/.test(digits) ? digits.replace(/,/g, '') : digits.replace(',', '.');
  }
  digits = digits.replace(/[.,]$/, '');
  if (!/^\d+(\.\d+)?$/.test(digits)) return null;
  return { value: sign * Number(digits), unit };
}

/** Reads a measured quantity; numbers stored as text, typed units and decimal commas are accepted. */
export function parseQuantity(value: CellValue, quantity: Quantity, headerScale = 1): Parsed<number> {
  if (typeof value === 'number')
    return Number.isFinite(value)
      ? { ok: true, value: value * headerScale * (UNITS[quantity][''] ?? 1) }
      : fail('is not a number');
  if (typeof value === 'boolean' || value instanceof Date) return fail('should be a number');
  const text = cellText(value);
  if (text === '') return blank();
  if (isPlaceholder(text)) return blank(true);
  const parsed = parseNumberText(text);
  if (!parsed) return fail(`"${text}" is not a number`);
  const factor = UNITS[quantity][unitKey(parsed.unit)];
  if (factor === undefined) return fail(`"${parsed.unit}" is not a unit we can read here`);
  return { ok: true, value: parsed.value * (parsed.unit === '' ? headerScale * factor : factor) };
}

/** Reads a whole number (pupils, adults). */
export function parseWholeNumber(value: CellValue): Parsed<number> {
  const parsed = parseQuantity(value, 'count');
  if (!parsed.ok || parsed.value === null) return parsed;
  const rounded = Math.round(parsed.value);
  if (Math.abs(parsed.value - rounded) > 1e-9) return fail(`${parsed.value} is not a whole number`);
  return { ok: true, value: rounded };
}

/** Excel's day 0 (serial numbers count days from 30 Dec 1899 in the 1900 date system). */
const EXCEL_EPOCH_MS = Date.UTC(1899, 11, 30);

/** Reads a year: 1968, "1968", "c. 1968", a date, or a date stored as an Excel serial number. */
export function parseYear(value: CellValue): Parsed<number> {
  if (value instanceof Date) return { ok: true, value: value.getUTCFullYear() };
  let n: number | null = null;
  if (typeof value === 'number') n = value;
  else {
    const text = cellText(value);
    if (text === '') return blank();
    if (isPlaceholder(text)) return blank(true);
    const year =
      /^(?:c\.?|circa|approx\.?)?\s*(\d{4})s?$/i.exec(text) ?? /^\d{1,2}[/.-]\d{1,2}[/.-](\d{4})$/.exec(text);
    if (year) n = Number(year[1]);
    else {
      const parsed = parseNumberText(text);
      if (parsed?.unit !== '') return fail(`"${text}" is not a year`);
      n = parsed.value;
    }
  }
  const { min, max } = BLOCK_LIMITS.yearBuilt;
  if (n >= min && n <= max && Number.isInteger(n)) return { ok: true, value: n };
  if (n > max && n < 80_000)
    return { ok: true, value: new Date(EXCEL_EPOCH_MS + Math.floor(n) * 86_400_000).getUTCFullYear() };
  return fail(`${n} is not a year between ${min} and ${max}`);
}

/** Bearings of the sixteen compass points, degrees clockwise from north. */
const COMPASS_16: Record<string, number> = {
  n: 0,
  nne: 22.5,
  ne: 45,
  ene: 67.5,
  e: 90,
  ese: 112.5,
  se: 135,
  sse: 157.5,
  s: 180,
  ssw: 202.5,
  sw: 225,
  wsw: 247.5,
  w: 270,
  wnw: 292.5,
  nw: 315,
  nnw: 337.5,
};

/** Reads an orientation: a bearing (225, "225°") or a compass point ("SW", "south-west", "South West"). */
export function parseOrientation(value: CellValue): Parsed<number> {
  let bearing: number | null = null;
  if (typeof value === 'number') bearing = value;
  else {
    const text = cellText(value);
    if (text === '') return blank();
    if (isPlaceholder(text)) return blank(true);
    const numeric = /^(\d+(?:[.,]\d+)?)\s*(°|deg|degrees)?$/i.exec(text);
    if (numeric) bearing = Number((numeric[1] ?? '').replace(',', '.'));
    else {
      const letters = text
        .toLowerCase()
        .replace(/facing/g, '')
        .replace(/north/g, 'n')
        .replace(/south/g, 's')
        .replace(/east/g, 'e')
        .replace(/west/g, 'w')
        .replace(/[^a-z]/g, '');
      const point = COMPASS_16[letters];
      if (point === undefined) return fail(`"${text}" is not a compass point or a bearing`);
      bearing = point;
    }
  }
  if (!Number.isFinite(bearing) || bearing < 0 || bearing > 360)
    return fail(`${bearing} is not a bearing from 0 to 360 degrees`);
  return { ok: true, value: Math.round(bearing) % 360 };
}

/** A key for matching words whatever their case, spacing and punctuation. */
export function looseKey(text: string): string {
  return text
    .toLowerCase()
    .replace(/&/g, 'and')
    .replace(/[^a-z0-9]/g, '');
}

/** Extra words people use for our codes (the codes and their labels are always accepted too). */
const ENUM_SYNONYMS: Record<string, string[]> = {
  // school phases
  primary: [
    'infant',
    'junior',
    'infants',
    'juniors',
    'first school',
    'ks1',
    'ks2',
    'key stage 1',
    'key stage 2',
    'primary school',
  ],
  secondary: [
    'secondary school',
    'high school',
    'ks3',
    'ks4',
    'key stage 3',
    'key stage 4',
    '11-16',
    '11-18',
    'upper school',
  ],
  all_through: ['all through', 'through school', '3-18', '4-18', '4-19'],
  special: ['sen', 'send', 'special school', 'specialist'],
  further_education: ['fe', 'college', 'sixth form college', 'further ed'],
  nursery: ['nursery school', 'pre-school', 'preschool'],
  // room uses
  classroom: [
    'class',
    'teaching room',
    'teaching space',
    'general teaching',
    'gen teaching',
    'form room',
    'teaching',
    'classrooms',
  ],
  science_lab: ['lab', 'laboratory', 'science', 'science laboratory', 'labs'],
  practical: [
    'dt',
    'd&t',
    'design and technology',
    'art',
    'art room',
    'food tech',
    'food technology',
    'workshop',
    'practical room',
    'technology',
  ],
  ict_room: ['ict', 'it', 'it suite', 'ict suite', 'computer room', 'computing', 'computer suite'],
  music_room: ['music', 'drama', 'performing arts'],
  hall: ['assembly hall', 'main hall', 'dining hall', 'school hall'],
  sports_hall: ['gym', 'gymnasium', 'pe', 'sports'],
  library: ['lrc', 'learning resource centre', 'resource centre'],
  office: ['admin', 'administration', 'offices', 'meeting room'],
  staff_room: ['staffroom', 'staff', 'staff workroom'],
  other: ['misc', 'miscellaneous', 'store', 'circulation'],
  // window frames
  timber: ['wood', 'wooden', 'timber frame'],
  pvc_u: ['pvc', 'upvc', 'u-pvc', 'pvcu', 'plastic'],
  metal: ['aluminium', 'aluminum', 'steel', 'metal frame', 'crittall'],
  metal_thermal_break: ['thermally broken aluminium', 'thermal break', 'aluminium thermal break'],
  // heating fuels
  gas: ['natural gas', 'mains gas', 'gas boiler'],
  oil: ['heating oil', 'kerosene', 'oil boiler'],
  electric: ['electricity', 'direct electric', 'electric heaters', 'storage heaters'],
  heat_pump: ['ashp', 'gshp', 'air source heat pump', 'ground source heat pump', 'heat pump'],
  district_heat: ['district heating', 'heat network'],
  // age groups
  early_years: ['eyfs', 'reception', 'nursery', 'foundation', 'early years foundation stage', '3-5', 'under 5'],
  sixth_form: ['post 16', 'post-16', 'ks5', 'key stage 5', '16-19', 'sixth form'],
  adult: ['adults', 'staff', '19+'],
  // window types
  side_hung: ['casement', 'side hung', 'side-hung', 'side hung casement'],
  top_hung: ['top hung', 'top-hung', 'top hung casement', 'awning'],
  bottom_hung: ['hopper', 'bottom hung', 'bottom-hung'],
  sliding_sash: ['sash', 'sliding', 'vertical sliding sash', 'box sash', 'sash window'],
  tilt_and_turn: ['tilt turn', 'tilt & turn', 'tilt and turn', 'tilt/turn'],
  pivot: ['centre pivot', 'horizontal pivot', 'vertical pivot', 'pivot window'],
  fixed: ['fixed light', 'non-opening', 'non opening', 'sealed', 'none'],
  // ventilation types
  natural_single_sided: [
    'natural',
    'natural single sided',
    'natural - single sided',
    'single sided',
    'single-sided',
    'windows',
    'openable windows',
    'nv',
    'natural ventilation',
  ],
  natural_cross: [
    'cross',
    'cross ventilation',
    'cross vent',
    'natural - cross',
    'natural cross flow',
    'cross-flow',
    'stack',
  ],
  mechanical_extract: ['mev', 'extract', 'extract fan', 'extract only', 'mechanical extract only'],
  mechanical_supply_extract: [
    'mvs',
    'ahu',
    'supply and extract',
    'supply & extract',
    'balanced',
    'balanced mechanical',
    'mechanical',
    'mechanical ventilation',
    'mv',
  ],
  heat_recovery_unit: [
    'mvhr',
    'hru',
    'hrv',
    'heat recovery',
    'mechanical ventilation with heat recovery',
    'erv',
    'heat-recovery',
  ],
  hybrid: ['mixed mode', 'mixed-mode', 'hybrid ventilation', 'natural with fan assist', 'fan assisted'],
};

const enumIndexCache = new Map<readonly string[], Map<string, string>>();

function enumIndex(codes: readonly string[]): Map<string, string> {
  let index = enumIndexCache.get(codes);
  if (index) return index;
  index = new Map();
  for (const code of codes) {
    index.set(looseKey(code), code);
    index.set(looseKey(label(code)), code);
  }
  for (const code of codes) {
    for (const synonym of ENUM_SYNONYMS[code] ?? []) {
      const key = looseKey(synonym);
      if (!index.has(key)) index.set(key, code);
    }
  }
  enumIndexCache.set(codes, index);
  return index;
}

const enumResultCache = new Map<readonly string[], Map<string, Parsed<string>>>();
/** Distinct short cell texts remembered per list of codes; a register repeats the same few words in a column. */
const ENUM_CACHE_LIMIT = 2000;

/** Reads one of our codes from its code, its label or a common synonym ("MVHR", "natural - single sided"). */
export function parseEnum<T extends string>(value: CellValue, codes: readonly T[]): Parsed<T> {
  if (typeof value !== 'string' || value.length > 64) return readEnum(value, codes);
  let cache = enumResultCache.get(codes);
  if (!cache) {
    cache = new Map();
    enumResultCache.set(codes, cache);
  }
  const known = cache.get(value);
  if (known) return known as Parsed<T>;
  const parsed = readEnum(value, codes);
  if (cache.size < ENUM_CACHE_LIMIT) cache.set(value, parsed);
  return parsed;
}

function readEnum<T extends string>(value: CellValue, codes: readonly T[]): Parsed<T> {
  const text = cellText(value);
  if (text === '') return blank();
  if (isPlaceholder(text)) return blank(true);
  const code = enumIndex(codes).get(looseKey(text));
  if (!code) return fail(`"${text}" is not one of: ${codes.map(label).join(', ')}`);
  return { ok: true, value: code as T };
}
