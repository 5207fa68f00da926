/**
 * Sensitivity of the programme's payback and NPV to energy prices and the discount rate, using the engine's
 * finance functions. A unit's net saving is energy (fuel saved less fan electricity, both priced) less
 * maintenance, so an energy price change of p scales the energy part only: S(p) = (1 + p)·(S + M) − M.
 */
import { discountedPaybackYears, npvLevel, simplePaybackYears } from '../../engine/finance';
import type { SensitivityCase } from './portfolio.types';

export interface ProgrammeMoney {
  capitalCostGbp: number;
  annualNetSavingGbp: number;
  annualMaintenanceGbp: number;
}

export const ENERGY_PRICE_CHANGES_PCT = [-30, -20, -10, 0, 10, 20, 30] as const;

/** Discount rates to show: a fixed spread around the baseline, with the baseline itself. */
export function discountRateCases(baseline: number): number[] {
  const rates = new Set([0, 0.02, baseline, 0.05, 0.07, 0.1].map((r) => Math.round(r * 10000) / 10000));
  return [...rates].sort((a, b) => a - b);
}

/** The programme's annual saving, paybacks and NPV with energy prices changed by `energyPriceChangePct`. */
export function sensitivityCase(
  money: ProgrammeMoney,
  args: { energyPriceChangePct: number; discountRate: number; appraisalYears: number },
): SensitivityCase {
  const energyGbp = money.annualNetSavingGbp + money.annualMaintenanceGbp;
  const saving = (1 + args.energyPriceChangePct / 100) * energyGbp - money.annualMaintenanceGbp;
  return {
    energyPriceChangePct: args.energyPriceChangePct,
    discountRate: args.discountRate,
    annualSavingGbp: saving,
    simplePaybackYears: simplePaybackYears(money.capitalCostGbp, saving),
    discountedPaybackYears: discountedPaybackYears({
      capitalGbp: money.capitalCostGbp,
      annualSavingGbp: saving,
      rate: args.discountRate,
    }),
    npvGbp: npvLevel({
      capitalGbp: money.capitalCostGbp,
      annualSavingGbp: saving,
      rate: args.discountRate,
      years: args.appraisalYears,
    }),
  };
}

/** Both sensitivity tables: energy price −30 %…+30 % at the baseline rate, and the rate spread at today's prices. */
export function programmeSensitivity(
  money: ProgrammeMoney,
  baseline: { discountRate: number; appraisalYears: number },
) {
  return {
    byEnergyPrice: ENERGY_PRICE_CHANGES_PCT.map((p) =>
      sensitivityCase(money, {
        energyPriceChangePct: p,
        discountRate: baseline.discountRate,
        appraisalYears: baseline.appraisalYears,
      }),
    ),
    byDiscountRate: discountRateCases(baseline.discountRate).map((r) =>
      sensitivityCase(money, { energyPriceChangePct: 0, discountRate: r, appraisalYears: baseline.appraisalYears }),
    ),
  };
}
