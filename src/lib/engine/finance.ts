/**
 * Engineering economics with end-of-year cash flows and a real discount rate (standard engineering
 * economics; discounting convention of HM Treasury (2022) The Green Book, annex A6).
 */

/**
 * Annuity factor AF(r, n) = (1 − (1+r)^−n)/r; AF(0, n) = n. r 0–0.5, n ≥ 0 years.
 * Evaluated as −expm1(−n·log1p(r))/r so that very small rates keep full precision.
 */
export function annuityFactor(rate: number, years: number): number {
  if (rate === 0) return years;
  if (!Number.isInteger(years) || years < 0 || years >= TABLE_YEARS)
    return -Math.expm1(-years * Math.log1p(rate)) / rate;
  const table = tableOf(rate);
  let value = table.annuity[years] as number;
  if (Number.isNaN(value)) {
    value = -Math.expm1(-years * Math.log1p(rate)) / rate;
    table.annuity[years] = value;
  }
  return value;
}

/** (1 + r)^t for whole years t, the divisor of a flow discounted t years. */
export function discountDivisor(rate: number, year: number): number {
  if (!Number.isInteger(year) || year < 0 || year >= TABLE_YEARS) return (1 + rate) ** year;
  const table = tableOf(rate);
  let value = table.power[year] as number;
  if (Number.isNaN(value)) {
    value = (1 + rate) ** year;
    table.power[year] = value;
  }
  return value;
}

/**
 * Whole-year annuity factors and discount divisors per rate, filled as asked: every room of a run asks for the same
 * rate, and payback searches ask for the same years again and again. Same formulas, so the same values.
 */
const TABLE_YEARS = 1003;
const tables = new Map<number, { annuity: Float64Array; power: Float64Array }>();
function tableOf(rate: number): { annuity: Float64Array; power: Float64Array } {
  let table = tables.get(rate);
  if (!table) {
    if (tables.size >= 32) tables.clear();
    table = {
      annuity: new Float64Array(TABLE_YEARS).fill(Number.NaN),
      power: new Float64Array(TABLE_YEARS).fill(Number.NaN),
    };
    tables.set(rate, table);
  }
  return table;
}

/** NPV of a level annual saving: −C0 + S·AF(r, n), £. */
export function npvLevel(args: { capitalGbp: number; annualSavingGbp: number; rate: number; years: number }): number {
  return -args.capitalGbp + args.annualSavingGbp * annuityFactor(args.rate, args.years);
}

/** Equivalent annual cost of capital, C0/AF(r, n), £/yr. */
export function equivalentAnnualCostGbp(args: { capitalGbp: number; rate: number; years: number }): number {
  return args.capitalGbp / annuityFactor(args.rate, args.years);
}

/** Simple payback C0/S, years; 0 with no capital and no loss; null ("never") when S ≤ 0 (or S < 0 with no capital). */
export function simplePaybackYears(capitalGbp: number, annualSavingGbp: number): number | null {
  if (capitalGbp <= 0) return annualSavingGbp >= 0 ? 0 : null;
  if (!(annualSavingGbp > 0)) return null;
  return capitalGbp / annualSavingGbp;
}

/** Closed-form discounted payback for a level saving: −ln(1 − r·C0/S)/ln(1+r), years; null when r·C0/S ≥ 1 or S ≤ 0. */
export function discountedPaybackClosedFormYears(args: {
  capitalGbp: number;
  annualSavingGbp: number;
  rate: number;
}): number | null {
  const { capitalGbp: c0, annualSavingGbp: s, rate: r } = args;
  if (c0 <= 0) return s >= 0 ? 0 : null;
  if (!(s > 0)) return null;
  if (r === 0) return c0 / s;
  const x = (r * c0) / s;
  if (x >= 1) return null;
  return -Math.log1p(-x) / Math.log1p(r);
}

/**
 * Discounted payback, years: the smallest year t with Σ_{k=1..t} S/(1+r)^k ≥ C0, with the fraction of the
 * crossing year found by linear interpolation (Green Book end-of-year convention). null ("never") when the saving never repays the capital.
 * Uses the same annuity factor as npvLevel, so NPV over n years ≥ 0 exactly when this is ≤ n.
 */
export function discountedPaybackYears(args: {
  capitalGbp: number;
  annualSavingGbp: number;
  rate: number;
}): number | null {
  const { capitalGbp: c0, annualSavingGbp: s, rate: r } = args;
  const closed = discountedPaybackClosedFormYears(args);
  if (closed === null || closed === 0) return closed;
  if (!Number.isFinite(closed)) return null;
  // Beyond a millennium the year-by-year search is pointless; the closed form is as good an answer.
  if (closed > 1000) return closed;
  let k = Math.max(1, Math.ceil(closed));
  while (k > 1 && s * annuityFactor(r, k - 1) >= c0) k -= 1;
  while (s * annuityFactor(r, k) < c0 && k < 1002) k += 1;
  const before = s * annuityFactor(r, k - 1);
  const inYear = s * annuityFactor(r, k) - before;
  return k - 1 + (c0 - before) / inYear;
}

/** NPV of end-of-year cash flows, flows[0] at t = 0: Σ F_t/(1+r)^t, £ (the numpy-financial / spreadsheet NPV with the first flow undiscounted). */
export function npvOfFlows(flows: readonly number[], rate: number): number {
  let npv = 0;
  let discount = 1;
  for (const f of flows) {
    npv += f / discount;
    discount *= 1 + rate;
  }
  return npv;
}

/**
 * Capital C0 now, a level annual saving S at the end of each year and replacement costs at the end of given years
 * (within the appraisal period): simple payback C0/S, discounted payback (first year the cumulative discounted
 * flows reach zero, interpolated within the year), NPV over `years`. With no replacements the discounted payback
 * is discountedPaybackYears' (closed form and search); with replacements it is found year by year.
 */
export function appraiseInvestment(args: {
  capitalGbp: number;
  annualSavingGbp: number;
  replacements: readonly { year: number; costGbp: number }[];
  rate: number;
  years: number;
}): { simplePaybackYears: number | null; discountedPaybackYears: number | null; npvGbp: number } {
  const { capitalGbp: c0, annualSavingGbp: s, replacements, rate: r, years } = args;
  let npv = npvLevel({ capitalGbp: c0, annualSavingGbp: s, rate: r, years });
  for (const rep of replacements) npv -= rep.costGbp / discountDivisor(r, rep.year);
  const simple = simplePaybackYears(c0, s);
  if (replacements.length === 0)
    return {
      simplePaybackYears: simple,
      discountedPaybackYears: discountedPaybackYears({ capitalGbp: c0, annualSavingGbp: s, rate: r }),
      npvGbp: npv,
    };
  let cumulative = -c0;
  let dpb: number | null = cumulative >= 0 ? 0 : null;
  for (let year = 1; dpb === null && year <= 1000; year++) {
    let flow = s;
    for (const rep of replacements) if (rep.year === year) flow -= rep.costGbp;
    const discounted = flow / discountDivisor(r, year);
    if (cumulative + discounted >= 0 && discounted > 0) dpb = year - 1 + -cumulative / discounted;
    cumulative += discounted;
    if (year > years && s <= 0) break;
  }
  return { simplePaybackYears: simple, discountedPaybackYears: dpb, npvGbp: npv };
}
