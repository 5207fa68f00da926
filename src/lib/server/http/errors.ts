import { ZodError } from 'zod';
import {
  BLOCK_LIMITS,
  limitMessage,
  MAX_GLAZING_PER_FLOOR_AREA,
  MIN_FLOOR_AREA_PER_OCCUPANT_M2,
  ROOM_LIMITS,
} from '../../engine/limits';

/** An error we expect and can explain to the person who caused it. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details: unknown = null,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export const badRequest = (message: string, details: unknown = null) =>
  new AppError(400, 'bad_request', message, details);
export const unauthenticated = () => new AppError(401, 'unauthenticated', 'Sign in to continue.');
export const forbidden = (action = 'do that') =>
  new AppError(
    403,
    'forbidden',
    `Your role in this trust does not allow you to ${action}. Ask a trust admin if you need it.`,
  );
export const notFound = (what: string) => new AppError(404, 'not_found', `${what} was not found in this trust.`);
export const conflict = (message: string, details: unknown = null) => new AppError(409, 'conflict', message, details);
export const paymentRequired = (message: string) => new AppError(402, 'payment_required', message);
export const methodNotAllowed = (message: string) => new AppError(405, 'method_not_allowed', message);

/**
 * Plain-language messages for our named database constraints (see db/migrations); range messages come from the one
 * declaration of limits (src/lib/engine/limits.ts).
 */
export const CONSTRAINT_MESSAGES: Record<string, string> = {
  invoice_payment_requests_purchase_order_length: 'A purchase-order number is 1 to 60 characters.',
  invoice_payment_requests_note_length: 'Keep the note under 500 characters.',
  invoice_payment_requests_status_known: 'An invoice payment request is requested, arranged or declined.',
  rooms_code_unique_in_school:
    'Another room in this school already has that room code. Room codes must be unique within a school.',
  rooms_openable_within_glazing: 'Openable window area cannot be larger than the glazing area, or negative.',
  rooms_floor_area_range: limitMessage(ROOM_LIMITS.floorAreaM2),
  rooms_ceiling_height_range: limitMessage(ROOM_LIMITS.ceilingHeightM),
  rooms_pupils_range: limitMessage(ROOM_LIMITS.pupils),
  rooms_adults_range: limitMessage(ROOM_LIMITS.adults),
  rooms_occupant_density: `No room can hold more than one person per ${MIN_FLOOR_AREA_PER_OCCUPANT_M2} m² of floor; check the floor area and the numbers.`,
  rooms_orientation_range: `${limitMessage(ROOM_LIMITS.orientationDeg)} (0° = north)`,
  rooms_glazing_range: `${limitMessage(ROOM_LIMITS.glazingAreaM2)} It can be at most ${MAX_GLAZING_PER_FLOOR_AREA} times the floor area.`,
  rooms_g_value_range: limitMessage(ROOM_LIMITS.glazingGValue),
  rooms_mechanical_supply_range: limitMessage(ROOM_LIMITS.mechanicalSupplyLps),
  rooms_winter_window_range: limitMessage(ROOM_LIMITS.winterWindowOpenFraction),
  rooms_frame_material_known: 'Window frame must be one of the listed materials.',
  blocks_fuel_price_range: limitMessage(BLOCK_LIMITS.fuelPriceGbpPerKwh),
  blocks_heating_efficiency_range:
    'Heating efficiency must fit the fuel: 0.3–1 for boilers, exactly 1 for direct electric, a seasonal COP of 1–6 for heat pumps.',
  schools_heating_efficiency_range:
    'Heating efficiency must fit the fuel: 0.3–1 for boilers, exactly 1 for direct electric, a seasonal COP of 1–6 for heat pumps.',
  rooms_block_in_same_school:
    'A room can only be placed in a block of its own school, and a block that still has rooms cannot be deleted.',
  rooms_code_present: 'Every room needs a room code.',
  schools_name_unique_in_trust: 'This trust already has a school with that name.',
  schools_reference_unique_in_trust: 'This trust already has a school with that reference number.',
  blocks_name_unique_in_school: 'This school already has a block with that name.',
  blocks_year_built_range: limitMessage(BLOCK_LIMITS.yearBuilt),
  blocks_air_permeability_range: limitMessage(BLOCK_LIMITS.airPermeabilityM3hM2),
  schools_fuel_price_range: limitMessage(BLOCK_LIMITS.fuelPriceGbpPerKwh),
  programmes_name_unique_in_trust: 'This trust already has a programme with that name. Choose another name.',
  programmes_name_present: 'A programme needs a name of 1 to 120 characters.',
};

interface PgError {
  code?: string;
  constraint?: string;
  detail?: string;
}

function isPgError(error: unknown): error is PgError {
  return typeof error === 'object' && error !== null && 'code' in error && typeof (error as PgError).code === 'string';
}

/** Turns a database constraint violation into an AppError, or returns null for other errors. */
export function fromDatabaseError(error: unknown): AppError | null {
  if (!isPgError(error)) return null;
  const constraint = error.constraint ?? '';
  const known = CONSTRAINT_MESSAGES[constraint];
  switch (error.code) {
    case '23505':
      return conflict(known ?? 'That value is already used and must be unique.', { constraint });
    case '23514':
    case '23502':
      return badRequest(known ?? 'A value is outside what makes physical sense for this field.', { constraint });
    case '23503':
      return conflict(known ?? 'This record is still referenced by another, or refers to one that does not exist.', {
        constraint,
      });
    case '22P02':
      return badRequest('A value has the wrong format (for example an identifier that is not a valid id).');
    case '22021':
    case '22P05':
      return badRequest(
        'A text value contains a character that cannot be stored (such as a NUL byte from a binary file). Remove it and try again.',
      );
    case '22001':
      return badRequest('A text value is longer than this field allows.');
    case '22003':
      return badRequest('A number is too large or too small for this field.');
    case '22007':
    case '22008':
      return badRequest('A date or time is not valid.');
    default:
      return null;
  }
}

const FIELD_LABELS: Record<string, string> = Object.fromEntries(
  [...Object.entries(ROOM_LIMITS), ...Object.entries(BLOCK_LIMITS)].map(([key, limit]) => [key, limit.label]),
);
/** Unit suffixes of our field names (house style), left out of the words people read. */
const UNIT_SUFFIX = /(M2|M3hM2|M|Lps|Gbp|Kwh|Ppm|Deg|C|Pct|Years|PerKwh|GbpPerKwh)$/;

/**
 * The words for a request field a person reads instead of its internal name: the declared label where there is one
 * ("Openable area"), else the name split into words without its unit suffix ("school id" → "School").
 */
export function fieldWords(path: readonly PropertyKey[]): string {
  const leaf = [...path].reverse().find((p) => typeof p === 'string') as string | undefined;
  if (!leaf) return '';
  const known = FIELD_LABELS[leaf];
  if (known) return known;
  const words = leaf
    .replace(UNIT_SUFFIX, '')
    .replace(/Id$/, '')
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/_/g, ' ')
    .toLowerCase()
    .trim();
  return words ? words[0]!.toUpperCase() + words.slice(1) : '';
}

/** Zod's own messages (not ones our schemas wrote) start like this; they are replaced by words. */
const ZOD_DEFAULT = /^(Too big|Too small|Invalid input|Invalid option|Invalid|Required|Expected)/;

/**
 * One zod issue in words. Messages our schemas wrote are kept (they say what to do); zod's defaults become a
 * sentence naming the field by its label, never by its internal name.
 */
function issueWords(issue: ZodError['issues'][number]): string {
  const leaf = [...issue.path].reverse().find((p) => typeof p === 'string') as string | undefined;
  const field = fieldWords(issue.path);
  if (!ZOD_DEFAULT.test(issue.message)) {
    if (!leaf || issue.message.includes(leaf) || issue.message.includes(field)) return issue.message;
    return `${field}: ${issue.message}`;
  }
  const subject = field || 'A value';
  switch (issue.code) {
    case 'too_big':
      return `${subject} must be at most ${Number(issue.maximum).toLocaleString('en-GB')}.`;
    case 'too_small':
      return `${subject} must be at least ${Number(issue.minimum).toLocaleString('en-GB')}.`;
    case 'invalid_type':
      return issue.input === undefined ? `${subject} is missing.` : `${subject} must be a ${issue.expected}.`;
    default:
      return `${subject} is not valid: ${issue.message.replace(ZOD_DEFAULT, '').replace(/^[:\s]+/, '')}`;
  }
}

/** What went wrong, as we tell the person: our named errors, zod's and named constraints'; anything else is a 500. */
export function describeError(error: unknown): AppError {
  if (error instanceof AppError) return error;
  if (error instanceof ZodError) {
    const details = error.issues.map((issue) => ({ path: issue.path.join('.'), message: issueWords(issue) }));
    const first = details[0];
    const message = first ? first.message : 'The request is not valid.';
    return new AppError(400, 'invalid_request', message, details);
  }
  const fromDb = fromDatabaseError(error);
  if (fromDb) return fromDb;
  console.error('Unexpected error', error);
  return new AppError(
    500,
    'internal_error',
    'Something went wrong on our side. Please try again; if it keeps happening, tell your trust admin.',
  );
}

/** The one place errors become HTTP responses: `{ error: { code, message, details } }`. */
export function toErrorResponse(error: unknown): Response {
  const { status, code, message, details } = describeError(error);
  return new Response(JSON.stringify({ error: { code, message, details } }), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8' },
  });
}
