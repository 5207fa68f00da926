/** Named errors of the capital programme feature. */
import { AppError, conflict, notFound } from '../http/errors';

export const programmeNotFound = () => notFound('That programme');

/** No results to plan from. */
export const noCandidates = () =>
  new AppError(
    409,
    'no_candidates',
    'There is nothing to plan yet: run an assessment first, so that rooms have recommended units and costs.',
  );

/** Rooms forced in or pinned cannot all fit. */
export const doesNotFit = (message: string) => conflict(message);

/** A school-limited member may not change a programme that covers other schools. */
export const programmeBeyondSchools = () =>
  new AppError(
    403,
    'forbidden',
    'This programme covers schools outside yours, so you can read your schools in it but not change it.',
  );
