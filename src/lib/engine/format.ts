/** Small, fast number formatting for the plain-language sentences (en-GB style thousands separators). */

/** Integer with thousands separators, e.g. 1900 → '1,900'. */
export function formatInt(x: number): string {
  const n = Math.round(x);
  const s = String(Math.abs(n));
  let out = '';
  for (let i = 0; i < s.length; i++) {
    if (i > 0 && (s.length - i) % 3 === 0) out += ',';
    out += s[i];
  }
  return n < 0 ? `-${out}` : out;
}

/** Number with at most one decimal, trailing zero dropped, e.g. 3 → '3', 2.45 → '2.5'. */
export function formatOneDecimal(x: number): string {
  const r = Math.round(x * 10) / 10;
  return Number.isInteger(r) ? formatInt(r) : `${formatInt(Math.trunc(r))}.${Math.abs(Math.round((r % 1) * 10))}`;
}

/** Money in whole pounds, e.g. 1234.5 → '£1,235'. */
export function formatGbp(x: number): string {
  return x < 0 ? `-£${formatInt(-x)}` : `£${formatInt(x)}`;
}
