/**
 * The one place the assessment reads a room's calibration from measured CO2 (RoomAssessmentInput.calibration):
 * checked here, applied in assess.ts as a factor on each season's window opening and as the infiltration flow.
 */
import { EngineInputError } from '../errors';
import type { RoomAssessmentInput, RoomCalibration } from '../types';

/** The input's calibration, checked (factors and flow finite and ≥ 0); null when the room has none. */
export function calibrationOf(input: RoomAssessmentInput): RoomCalibration | null {
  const c = input.calibration ?? null;
  if (c === null) return null;
  for (const [season, factor] of Object.entries(c.windowUseFactor))
    if (!(typeof factor === 'number' && Number.isFinite(factor) && factor >= 0))
      throw new EngineInputError(
        `calibration.windowUseFactor.${season}`,
        `must be a number of zero or more, got ${String(factor)}`,
      );
  if (c.infiltrationLps !== null && !(Number.isFinite(c.infiltrationLps) && c.infiltrationLps >= 0))
    throw new EngineInputError(
      'calibration.infiltrationLps',
      `must be a flow of zero or more, got ${String(c.infiltrationLps)}`,
    );
  return c;
}

/** The line a calibrated result lists among its defaults, e.g. 'Calibrated from 42 days of readings: …'. */
export function describeCalibration(c: RoomCalibration): string {
  const parts = Object.entries(c.windowUseFactor).map(
    ([s, f]) => `window use ×${(f as number).toFixed(2)} in ${s === 'mid' ? 'spring and autumn' : s}`,
  );
  if (c.infiltrationLps !== null) parts.push(`infiltration ${c.infiltrationLps.toFixed(1)} l/s`);
  const text = c.label.charAt(0).toUpperCase() + c.label.slice(1);
  return parts.length > 0 ? `${text}: ${parts.join(', ')}` : text;
}
