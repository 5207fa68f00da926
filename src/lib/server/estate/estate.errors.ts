/** Named errors of the estate: what went wrong with a school, block or room edit, in words a person can act on. */
import { AppError, badRequest, conflict, forbidden } from '../http/errors';
import type { FieldProblem } from './checks';

/** A room that fails the sense checks (400), with each problem; `room` names it when several were edited at once. */
export const invalidRoom = (problems: FieldProblem[], room?: { id: string; code: string }) =>
  room
    ? new AppError(
        400,
        'invalid_room',
        `Room ${room.code}: ${problems.map((p) => p.message).join(' ')} Nothing was changed.`,
        { roomId: room.id, problems },
      )
    : new AppError(400, 'invalid_room', problems.map((p) => p.message).join(' '), problems);

/** A block named for a room that belongs to another school. */
export const blockNotInSchool = () => badRequest("That block is not part of the room's school.");

/** A heating efficiency that does not fit the fuel it is for (the message from checks.ts efficiencyProblem). */
export const efficiencyDoesNotFit = (message: string) => badRequest(message, { field: 'heatingEfficiency' });

/** Members limited to chosen schools cannot add schools. */
export const schoolsLimited = () => forbidden('add schools while your membership is limited to chosen schools');

/** The room changed since the editor opened it (409). */
export const roomChangedSince = () =>
  conflict('Someone else changed this room since you opened it. Reload to see their change, then edit again.');

/** 403: members limited to chosen schools cannot remove schools (removing one changes the whole trust's estate). */
export const schoolRemovalLimited = () =>
  forbidden('remove schools while your membership is limited to chosen schools');
