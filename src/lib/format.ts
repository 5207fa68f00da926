/**
 * Display formatting shared by pages and islands: one way (en-GB, UK time, units spelled as the trade writes them).
 * Dates and times are assembled from their parts in UK time, so the server's render and the browser's hydration
 * read the same text whatever the server's or the reader's own time zone and ICU version.
 */
const integer = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });
const oneDecimal = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });
const money = new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'GBP', maximumFractionDigits: 0 });

export const formatInteger = (value: number) => integer.format(value);
export const formatNumber = (value: number) => oneDecimal.format(value);
export const formatGbp = (value: number) => money.format(value);
/** A count with its noun, singular for one: "1 room", "3 rooms" (nouns whose plural adds an s). */
export const formatCount = (value: number, noun: string) => `${integer.format(value)} ${noun}${value === 1 ? '' : 's'}`;

const fixedFormats = new Map<string, Intl.NumberFormat>();
/** A number with thousands separators and between `min` and `max` decimals, e.g. (2.5, 2, 2) → "2.50". */
export function formatDecimals(value: number, max: number, min = 0): string {
  const key = `${min}:${max}`;
  let f = fixedFormats.get(key);
  if (!f) {
    f = new Intl.NumberFormat('en-GB', { minimumFractionDigits: min, maximumFractionDigits: max });
    fixedFormats.set(key, f);
  }
  return f.format(value);
}

/** A height as entered: two decimals when the value has them ("2.75 m"), else one ("3.1 m", "3 m"). */
export const formatHeightM = (value: number) => `${formatDecimals(value, 2)} m`;

/** A share 0–1 as a percentage, e.g. 0.035 → "3.5 %". */
export const formatPercent = (share: number, maxDecimals = 1) => `${formatDecimals(share * 100, maxDecimals)} %`;

/** An energy price in pence a kWh as tariffs are quoted, e.g. 0.07 → "7 p/kWh", 0.2455 → "24.55 p/kWh". */
export const formatPencePerKwh = (gbpPerKwh: number) => `${formatDecimals(gbpPerKwh * 100, 2)} p/kWh`;

/** A carbon factor, e.g. 0.183 → "0.183 kgCO₂e/kWh". */
export const formatKgCo2ePerKwh = (value: number) => `${formatDecimals(value, 4, 3)} kgCO₂e/kWh`;

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;
const ukParts = new Intl.DateTimeFormat('en-GB', {
  timeZone: 'Europe/London',
  year: 'numeric',
  month: 'numeric',
  day: 'numeric',
  hour: '2-digit',
  minute: '2-digit',
  hourCycle: 'h23',
});

function partsOf(value: string | Date): { day: number; month: number; year: number; time: string } | null {
  const date = typeof value === 'string' ? new Date(value) : value;
  if (Number.isNaN(date.getTime())) return null;
  const p: Record<string, string> = {};
  for (const part of ukParts.formatToParts(date)) p[part.type] = part.value;
  return { day: Number(p.day), month: Number(p.month), year: Number(p.year), time: `${p.hour}:${p.minute}` };
}

/** A date in UK time, e.g. "2 Dec 2026"; a dash when missing. Plain dates ("2026-12-02") are taken as written. */
export function formatDate(value: string | Date | null | undefined): string {
  if (value === null || value === undefined || value === '') return '—';
  if (typeof value === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(value)) {
    const [y, m, d] = value.split('-').map(Number) as [number, number, number];
    return `${d} ${MONTHS[m - 1]} ${y}`;
  }
  const p = partsOf(value);
  return p ? `${p.day} ${MONTHS[p.month - 1]} ${p.year}` : '—';
}

/** A moment in UK time, e.g. "2 Dec 2026, 08:08"; a dash when missing. */
export function formatDateTime(value: string | Date | null | undefined): string {
  if (value === null || value === undefined || value === '') return '—';
  const p = partsOf(value);
  return p ? `${p.day} ${MONTHS[p.month - 1]} ${p.year}, ${p.time}` : '—';
}

/** A bearing as degrees with its nearest compass point, e.g. "225° (SW)". */
export function formatBearing(deg: number | null): string {
  if (deg === null) return 'Not recorded';
  const points = ['N', 'NE', 'E', 'SE', 'S', 'SW', 'W', 'NW'];
  return `${deg}° (${points[Math.round(deg / 45) % 8]})`;
}

/** A value or a dash when it is missing. */
export const orDash = (value: string | number | null | undefined) =>
  value === null || value === undefined || value === '' ? '—' : String(value);
