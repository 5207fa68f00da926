/**
 * Starting values for a new programme, each with where it comes from. The trust changes all of them.
 */
import { DEFAULT_WINDOW_DAYS } from './calendar';
import { type ProgrammeSettings, WINDOW_IDS, type YearConvention } from './types';

/** Where each default comes from, for the settings form, the exports and the report. */
export const DEFAULT_SOURCES = {
  preliminariesRate:
    'Main contractor’s preliminaries, 10 % of the works: common practice for small building-services works (no single source).',
  feesRate: 'Project and design team fees, 12 % of works and preliminaries: common practice (no single source).',
  contingencyRate:
    'Risk allowance (contingency), 10 % of the base cost: common practice at feasibility stage (RICS NRM 1 asks for a risk allowance; the rate is the trust’s).',
  inflationRatePerYear:
    'Construction inflation, 3.5 % a year: from memory of recent UK tender-price forecasts; replace with the trust’s cost adviser’s figure.',
  vatRate: 'VAT at the UK standard rate, 20 % (VAT Act 1994 s.2, as amended from 4 January 2011).',
  vatRecoverable:
    'Academy trusts can recover VAT on non-business activity under s.33D of the VAT Act 1994, local authorities under s.33 (from memory): check with the trust’s finance team.',
  windows:
    'A week (5 working days) at each half-term, 8 at Easter (two weeks less the bank holidays) and 25 in the summer holiday a contractor can use: common practice (no single source).',
  unitsPerWorkingDay:
    'Four units a working day across the contractor’s teams: an Airtally starting value; ask the installer.',
  mobilisationGbp:
    'Mobilisation of £1,500 per school visit (site set-up, access, welfare, clearing up): an Airtally starting value; ask the installer.',
  order:
    'On-costs are built up in the order of RICS NRM 1 (2nd edition): works, preliminaries, fees, risk allowance, inflation, then VAT.',
} as const;

/** A new programme's settings: five school years from the next September, £250,000 a year. */
export function defaultProgrammeSettings(today: Date, yearConvention: YearConvention = 'sep_aug'): ProgrammeSettings {
  const month = today.getUTCMonth() + 1;
  const year = today.getUTCFullYear();
  // The next year that has not started: September (or April) of this year if it is still ahead, else next year.
  const startMonth = yearConvention === 'sep_aug' ? 9 : 4;
  const firstYear = month < startMonth ? year : year + 1;
  return {
    yearConvention,
    firstYear,
    budgetsGbp: [250_000, 250_000, 250_000, 250_000, 250_000],
    onCosts: {
      preliminariesRate: 0.1,
      feesRate: 0.12,
      contingencyRate: 0.1,
      inflationRatePerYear: 0.035,
      vatRate: 0.2,
      vatRecoverable: true,
    },
    windows: WINDOW_IDS.map((id) => ({ id, workingDays: DEFAULT_WINDOW_DAYS[id] })),
    unitsPerWorkingDay: 4,
    mobilisationGbp: 1500,
    forcedIn: [],
    keptOut: [],
    heatingJoins: [],
    pins: [],
    objective: 'pupil_hours',
    energyPriceChangePct: 0,
  };
}
