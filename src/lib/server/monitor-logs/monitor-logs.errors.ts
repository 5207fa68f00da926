/** Named errors of the monitor-log feature. */
import { AppError, badRequest, forbidden } from '../http/errors';

/** 400: a log with no usable reading at all; nothing was stored. */
export const noReadings = (problems: unknown) =>
  new AppError(
    400,
    'no_readings',
    'No CO2 reading in this file could be used (see the problems listed). Nothing was stored. Check the export settings and upload it again.',
    { problems },
  );

/** 403: a school-limited member acting on a log that covers rooms of other schools. */
export const otherSchoolsInLog = () =>
  forbidden('change a log that covers rooms in schools outside your access (ask a trust-wide colleague)');

/** 400: the request body is missing (the upload must be the file itself). */
export const bodyMissing = () =>
  badRequest(
    'Send the log file itself as the request body (not a form), with its name in the fileName query parameter.',
  );
