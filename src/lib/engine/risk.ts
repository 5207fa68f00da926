/** Risk: pupil-hours a year above the room's criterion threshold, banded with our own names. */
import type { RiskBand } from './types';

/** Words a person reads for each band. */
export const RISK_BAND_LABELS: Record<RiskBand, string> = {
  fresh: 'Fresh',
  stuffy: 'Stuffy at times',
  stale: 'Often stale',
  very_stale: 'Stale most days',
};
