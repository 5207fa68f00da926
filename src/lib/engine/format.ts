/** Small, fast number formatting for the plain-language sentences (en-GB style thousands separators). */

/** Integer with thousands separators, e.g. 1900 → '1,900'. */
export function formatInt(x: number): string {
  const n = Math.round(x);
  if (n > -1000 && n < 1000) return n === 0 ? '0' : String(n);
  // Results repeat the same few thousands (thresholds, CO2 means): those are written once.
  if (n >= 1000 && n < CACHED_UP_TO) {
    let text = CACHED[n];
    if (text === undefined) {
      text = withSeparators(n);
      CACHED[n] = text;
    }
    return text;
  }
  return withSeparators(n);
}

const CACHED_UP_TO = 20_000;
const CACHED: (string | undefined)[] = new Array<string | undefined>(CACHED_UP_TO).fill(undefined);

function withSeparators(n: number): string {
  const s = String(Math.abs(n));
  const head = s.length % 3 || 3;
  let out = s.slice(0, head);
  for (let i = head; i < s.length; i += 3) out += `,${s.slice(i, i + 3)}`;
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
