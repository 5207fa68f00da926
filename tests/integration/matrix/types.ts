// The shape of the authorisation matrix. Each feature adds its own file next to this one,
// exporting `entries: MatrixEntry[]`; authorisation-matrix.test.ts loads every file in this folder.

/**
 * Who asks: nobody, each demo role in the demo trust, an estates manager of the demo trust limited to one
 * school (see tests/helpers/school-limited.ts), and the trust admin of another trust.
 */
export const ACTORS = [
  'anonymous',
  'viewer',
  'finance_lead',
  'estates_manager',
  'school_limited',
  'trust_admin',
  'other_trust',
] as const;
export type Actor = (typeof ACTORS)[number];

/** Ids the entries can use, read from the demo trust before the matrix runs. */
export interface MatrixContext {
  /** A school of the demo trust that the school-limited member may not see. */
  demoSchoolId: string;
  /** A room of that school. */
  demoRoomId: string;
  /** The school the school-limited member may see. */
  limitedSchoolId: string;
  /** An import the trust admin previewed, whose missing rooms span every school. */
  foreignImportId: string;
  /** A finished run of `demoSchoolId`. */
  otherSchoolRunId: string;
  /** A finished trust-wide run with a problem naming a room of `demoSchoolId`. */
  trustRunId: string;
  /** The other trust's id (its admin is the `other_trust` actor). */
  otherTrustId: string;
  /** A fresh e-mail address, different on every call. */
  uniqueEmail: () => string;
}

type Resolvable<T> = T | ((ctx: MatrixContext) => T);

export interface MatrixEntry {
  /** The route file under src/pages/api, e.g. 'schools/[id].ts'. */
  file: string;
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** The concrete path to call, e.g. '/api/schools/…'. */
  path: Resolvable<string>;
  /** JSON body for writes. Prefer bodies and ids that change nothing (unknown ids, invalid input). */
  body?: ((ctx: MatrixContext) => unknown) | Record<string, unknown> | unknown[] | string | number | boolean | null;
  /**
   * The status each actor must get. Whatever the school-limited member gets with a 2xx is also searched
   * for the ids and names of schools, blocks and rooms outside their school: none may appear.
   */
  expect: Record<Actor, number>;
  /** Why the statuses are what they are, when not obvious. */
  note?: string;
}

/** Everyone gets the same status. */
export const all = (status: number): Record<Actor, number> =>
  Object.fromEntries(ACTORS.map((a) => [a, status])) as Record<Actor, number>;

/** 401 for anonymous callers, `status` for every signed-in actor. */
export const signedIn = (status: number): Record<Actor, number> => ({ ...all(status), anonymous: 401 });

/**
 * Writers (estates manager, trust admin and the other trust's admin in their own trust) get `status`; viewers and
 * finance leads 403. The school-limited estates manager gets `limited` (404 for rows of a school they may not see).
 */
export const writers = (status: number, other = status, limited = status): Record<Actor, number> => ({
  anonymous: 401,
  viewer: 403,
  finance_lead: 403,
  estates_manager: status,
  school_limited: limited,
  trust_admin: status,
  other_trust: other,
});
