/** Display formatting shared by pages and islands (en-GB, units spelled as the trade writes them). */
const integer = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });
const oneDecimal = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });
const money = new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'GBP', maximumFractionDigits: 0 });

export const formatInteger = (value: number) => integer.format(value);
export const formatNumber = (value: number) => oneDecimal.format(value);
export const formatGbp = (value: number) => money.format(value);
/** A count with its noun, singular for one: "1 room", "3 rooms" (nouns whose plural adds an s). */
export const formatCount = (value: number, noun: string) => `${integer.format(value)} ${noun}${value === 1 ? '' : 's'}`;

/** A bearing as degrees with its nearest compass point, e.g. "225° (SW)". */
export function formatBearing(deg: number | null): string {
  if (deg === null) return 'Not recorded';
  const points = ['N', 'NE', 'E', 'SE', 'S', 'SW', 'W', 'NW'];
  return `${deg}° (${points[Math.round(deg / 45) % 8]})`;
}

/** A value or a dash when it is missing. */
export const orDash = (value: string | number | null | undefined) =>
  value === null || value === undefined || value === '' ? '—' : String(value);
