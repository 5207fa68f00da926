/** Rooms that must be in the plan (forced in or pinned) but fit in no window: the budget or capacity is too small. */
export class ProgrammeInfeasibleError extends Error {
  readonly code = 'PROGRAMME_INFEASIBLE' as const;

  constructor(
    /** The rooms that could not be placed. */
    readonly roomIds: string[],
    message: string,
  ) {
    super(message);
    this.name = 'ProgrammeInfeasibleError';
  }
}
