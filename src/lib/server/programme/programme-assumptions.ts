/** The programme's assumptions as lines of name, value and source, for the page, the workbook and the report. */
import { WINDOW_LABELS, YEAR_CONVENTION_LABELS } from '../../engine/programme/calendar';
import { DEFAULT_SOURCES } from '../../engine/programme/defaults';
import type { ProgrammeView } from './programme.types';

const pct = (v: number) => `${(v * 100).toLocaleString('en-GB', { maximumFractionDigits: 2 })} %`;
const gbp = (v: number) => `£${Math.round(v).toLocaleString('en-GB')}`;

export interface AssumptionLine {
  name: string;
  value: string;
  source: string;
}

/** Every setting the plan used, with where its starting value came from. */
export function assumptionLines(view: Pick<ProgrammeView, 'settings' | 'source' | 'yearLabels'>): AssumptionLine[] {
  const s = view.settings;
  const o = s.onCosts;
  return [
    { name: 'Programme years', value: YEAR_CONVENTION_LABELS[s.yearConvention], source: 'The trust’s choice.' },
    {
      name: 'Capital per year',
      value: s.budgetsGbp.map((b, i) => `${view.yearLabels[i]}: ${gbp(b)}`).join('; '),
      source: 'The trust’s capital available, with on-costs.',
    },
    { name: 'Preliminaries', value: pct(o.preliminariesRate), source: DEFAULT_SOURCES.preliminariesRate },
    { name: 'Project and design team fees', value: pct(o.feesRate), source: DEFAULT_SOURCES.feesRate },
    { name: 'Contingency (risk allowance)', value: pct(o.contingencyRate), source: DEFAULT_SOURCES.contingencyRate },
    { name: 'Inflation a year', value: pct(o.inflationRatePerYear), source: DEFAULT_SOURCES.inflationRatePerYear },
    { name: 'VAT', value: pct(o.vatRate), source: DEFAULT_SOURCES.vatRate },
    {
      name: 'VAT recovered by the trust',
      value: o.vatRecoverable ? 'Yes' : 'No',
      source: DEFAULT_SOURCES.vatRecoverable,
    },
    {
      name: 'Works windows (working days)',
      value: s.windows.map((w) => `${WINDOW_LABELS[w.id]} ${w.workingDays}`).join('; '),
      source: DEFAULT_SOURCES.windows,
    },
    {
      name: 'Units fitted per working day',
      value: String(s.unitsPerWorkingDay),
      source: DEFAULT_SOURCES.unitsPerWorkingDay,
    },
    {
      name: 'Mobilisation per school visit (before on-costs)',
      value: gbp(s.mobilisationGbp),
      source: DEFAULT_SOURCES.mobilisationGbp,
    },
    {
      name: 'What the plan maximises',
      value: s.objective === 'pupil_hours' ? 'Pupil-hours of poor air removed a year' : 'The trust’s ranking weights',
      source:
        'Each year sooner is worth 1 % more, so among equal plans the worst air is cleared first (an Airtally rule).',
    },
    {
      name: 'Energy prices against the assessment',
      value: `${s.energyPriceChangePct > 0 ? '+' : ''}${s.energyPriceChangePct} %`,
      source: 'Scenario setting: scales the energy part of money saved; maintenance is unchanged.',
    },
    {
      name: 'Assessment results used',
      value: view.source.assumptionsVersions.join(', ') || 'not recorded',
      source: `Current results read ${view.source.readAt.slice(0, 10)}; unit costs, savings and pupil-hours come from the appraisal under these assumption versions.`,
    },
  ];
}
