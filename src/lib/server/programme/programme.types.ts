/** Shapes the capital programme API returns; islands import them through src/lib/client. */
import type { CumulativePoint, ProgrammeReport } from '../../engine/programme/report';
import type { ProgrammeSettings } from '../../engine/programme/types';
import type { CandidateSource } from './candidates.repository';

export type { ProgrammeReport, ProgrammeSettings, CandidateSource };

/** One programme in the list and in comparisons. */
export interface ProgrammeSummary {
  id: string;
  name: string;
  createdAt: string;
  updatedAt: string;
  updatedByEmail: string | null;
  yearLabels: string[];
  budgetTotalGbp: number;
  rooms: number;
  units: number;
  capitalGbp: number;
  pupils: number;
  pupilHoursRemovedPerYear: number;
  annualSavingKgCo2e: number;
  annualSavingGbp: number;
  lifetimeTonnesCo2e: number;
  gapPct: number;
  method: string;
  assumptionsVersions: string[];
  energyPriceChangePct: number;
  objective: ProgrammeSettings['objective'];
  /** True when the reader sees only some of the programme's schools. */
  partial: boolean;
}

/** A programme as its page shows it. */
export interface ProgrammeView {
  id: string;
  name: string;
  settings: ProgrammeSettings;
  source: CandidateSource;
  report: ProgrammeReport;
  yearLabels: string[];
  /** Pupil-hours a year (or score) of the whole plan, all schools. */
  planValue: number;
  /** Pupil-hours a year (or score) of the best plan without the rooms pinned by hand; null when nothing is pinned. */
  freeValue: number | null;
  canEdit: boolean;
  /** Null: the whole trust; otherwise the schools the programme covers. */
  scopeSchoolIds: string[] | null;
  createdAt: string;
  createdByEmail: string | null;
  updatedAt: string;
  updatedByEmail: string | null;
  /** Names of the rooms, blocks and schools the settings refer to (pins, forced, kept out, heating joins). */
  names: { rooms: Record<string, string>; blocks: Record<string, string> };
}

/** What a change by hand did to the plan's benefit. */
export interface EditImpact {
  valueBefore: number;
  valueAfter: number;
  words: string;
}

/** Two or three programmes side by side. */
export interface ProgrammeComparison {
  programmes: ProgrammeSummary[];
  series: { id: string; name: string; points: CumulativePoint[] }[];
}
