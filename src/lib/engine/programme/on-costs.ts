/**
 * On-costs on the installed price of ventilation units, built up in the order of the RICS New Rules of
 * Measurement, NRM 1 (2nd edition, 2012: order of cost estimating and cost planning for capital building
 * works) — secondary source: quantity-surveying guidance summarising its cost-limit structure:
 *
 *   works (installed price)                        W
 *   + main contractor's preliminaries   p·W        → works cost estimate      E = W(1 + p)
 *   + project and design team fees      f·E        → base cost                B = E(1 + f)
 *   + risk allowance (contingency)      c·B        → cost limit, today        L = B(1 + c)
 *   + inflation to programme year n     L((1+i)^(n−1) − 1)                    N = L(1 + i)^(n−1)
 *   + VAT (NRM 1 assesses it apart)     v·N        → gross                    G = N(1 + v)
 *
 * The budget carries N when the trust recovers VAT (academy trusts under s.33D of the VAT Act 1994; local
 * authorities under s.33 — from memory) and G otherwise. Every step is a multiplication, so the whole is
 * one factor per year; the plan multiplies each room's installed price (and each visit's mobilisation) by it.
 */
import { EngineInputError, requireRange } from '../errors';
import type { OnCostRates } from './types';

/** The build-up of one price for one programme year, £. */
export interface OnCostBreakdown {
  worksGbp: number;
  preliminariesGbp: number;
  feesGbp: number;
  contingencyGbp: number;
  inflationGbp: number;
  /** Capital before VAT (N above). */
  netGbp: number;
  vatGbp: number;
  /** Capital with VAT (G above). */
  grossGbp: number;
  /** What the budget carries: net when VAT is recovered, gross otherwise. */
  chargedGbp: number;
}

/** Checks each rate's range (fractions): preliminaries, fees and contingency 0–1, inflation 0–0.5, VAT 0–0.5. */
export function checkOnCostRates(r: OnCostRates): void {
  requireRange('onCosts.preliminariesRate', r.preliminariesRate, 0, 1);
  requireRange('onCosts.feesRate', r.feesRate, 0, 1);
  requireRange('onCosts.contingencyRate', r.contingencyRate, 0, 1);
  requireRange('onCosts.inflationRatePerYear', r.inflationRatePerYear, 0, 0.5);
  requireRange('onCosts.vatRate', r.vatRate, 0, 0.5);
  if (typeof r.vatRecoverable !== 'boolean')
    throw new EngineInputError('onCosts.vatRecoverable', 'must be true or false');
}

/**
 * The on-cost build-up of `worksGbp` (installed price at today's prices, ≥ 0) in programme year `year` (1-based).
 */
export function onCostBreakdown(worksGbp: number, rates: OnCostRates, year: number): OnCostBreakdown {
  if (!Number.isInteger(year) || year < 1)
    throw new EngineInputError('year', `must be a programme year from 1, got ${year}`);
  const preliminariesGbp = worksGbp * rates.preliminariesRate;
  const worksEstimate = worksGbp + preliminariesGbp;
  const feesGbp = worksEstimate * rates.feesRate;
  const base = worksEstimate + feesGbp;
  const contingencyGbp = base * rates.contingencyRate;
  const costLimitToday = base + contingencyGbp;
  const netGbp = costLimitToday * (1 + rates.inflationRatePerYear) ** (year - 1);
  const inflationGbp = netGbp - costLimitToday;
  const vatGbp = netGbp * rates.vatRate;
  const grossGbp = netGbp + vatGbp;
  return {
    worksGbp,
    preliminariesGbp,
    feesGbp,
    contingencyGbp,
    inflationGbp,
    netGbp,
    vatGbp,
    grossGbp,
    chargedGbp: rates.vatRecoverable ? netGbp : grossGbp,
  };
}

/** The multiplier from installed price to capital charged in programme year `year`. */
export function costFactor(rates: OnCostRates, year: number): number {
  return onCostBreakdown(1, rates, year).chargedGbp;
}

/** Adds breakdowns line by line. */
export function sumBreakdowns(list: readonly OnCostBreakdown[]): OnCostBreakdown {
  const total: OnCostBreakdown = {
    worksGbp: 0,
    preliminariesGbp: 0,
    feesGbp: 0,
    contingencyGbp: 0,
    inflationGbp: 0,
    netGbp: 0,
    vatGbp: 0,
    grossGbp: 0,
    chargedGbp: 0,
  };
  for (const b of list) for (const key of Object.keys(total) as (keyof OnCostBreakdown)[]) total[key] += b[key];
  return total;
}
