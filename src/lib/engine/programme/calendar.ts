/**
 * Programme years and holiday works windows. A September–August year is the school's academic year; an
 * April–March year is the public-sector financial year (the trust chooses). Each year has the same four
 * windows; only their order differs. Window lengths are the trust's; the defaults are common practice
 * (no single source): a week at each half-term, two weeks at Easter less the bank holidays, and the
 * part of the summer holiday a contractor can work while the school is empty.
 */
import { type WindowId, type YearConvention, WINDOW_IDS } from './types';

/** Windows in the order they fall within a programme year. */
export const WINDOW_ORDER: Record<YearConvention, readonly WindowId[]> = {
  sep_aug: WINDOW_IDS,
  apr_mar: ['easter', 'summer', 'october', 'february'],
};

/** What each window is called. */
export const WINDOW_LABELS: Record<WindowId, string> = {
  october: 'October half-term',
  february: 'February half-term',
  easter: 'Easter holiday',
  summer: 'Summer holiday',
};

/** Default working days per window (common practice, no single source). */
export const DEFAULT_WINDOW_DAYS: Record<WindowId, number> = { october: 5, february: 5, easter: 8, summer: 25 };

/** "2027/28" for a September–August year, "2027–28" for an April–March (financial) year. */
export function programmeYearLabel(convention: YearConvention, firstYear: number, year: number): string {
  const start = firstYear + year - 1;
  const end = String((start + 1) % 100).padStart(2, '0');
  return convention === 'sep_aug' ? `${start}/${end}` : `${start}–${end}`;
}

/** The calendar year a window of programme year `year` falls in. */
export function windowCalendarYear(
  convention: YearConvention,
  firstYear: number,
  year: number,
  windowId: WindowId,
): number {
  const start = firstYear + year - 1;
  const inSecondCalendarYear = convention === 'sep_aug' ? windowId !== 'october' : windowId === 'february';
  return inSecondCalendarYear ? start + 1 : start;
}

/** "Summer holiday 2028" */
export function windowLabel(convention: YearConvention, firstYear: number, year: number, windowId: WindowId): string {
  return `${WINDOW_LABELS[windowId]} ${windowCalendarYear(convention, firstYear, year, windowId)}`;
}

/** The words for a year convention. */
export const YEAR_CONVENTION_LABELS: Record<YearConvention, string> = {
  sep_aug: 'School years (September–August)',
  apr_mar: 'Financial years (April–March)',
};
