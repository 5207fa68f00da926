import { signedIn, type MatrixEntry } from './types';

const UNKNOWN_RUN = '00000000-0000-4000-8000-000000000000';

/**
 * The assessments API: every role reads runs, results, the export and the assumptions, and may ask a what-if
 * (it saves nothing); viewers start no runs and change no assumptions. Write bodies here are invalid after the
 * permission check, so nothing is started or saved. Another trust's admin gets 404 for the demo trust's room.
 */
export const entries: MatrixEntry[] = [
  {
    file: 'assessments/index.ts',
    method: 'GET',
    path: '/api/assessments',
    expect: signedIn(200),
    note: 'the other trust sees its own empty list',
  },
  {
    file: 'assessments/index.ts',
    method: 'POST',
    path: '/api/assessments',
    body: { scope: 'school' },
    expect: {
      anonymous: 401,
      viewer: 403,
      finance_lead: 400,
      estates_manager: 400,
      school_limited: 400,
      trust_admin: 400,
      other_trust: 400,
    },
    note: 'a school scope without a schoolId is refused after the permission check, so no run starts',
  },
  { file: 'assessments/[id].ts', method: 'GET', path: `/api/assessments/${UNKNOWN_RUN}`, expect: signedIn(404) },
  {
    file: 'assessments/[id].ts',
    method: 'GET',
    path: (c) => `/api/assessments/${c.otherSchoolRunId}`,
    expect: { ...signedIn(200), school_limited: 404, other_trust: 404 },
    note: 'a run of another school is not found for a member limited to one school',
  },
  {
    file: 'assessments/[id].ts',
    method: 'GET',
    path: (c) => `/api/assessments/${c.trustRunId}`,
    expect: { ...signedIn(200), other_trust: 404 },
    note: "a trust-wide run: the school-limited member sees it without the problems of other schools' rooms",
  },
  {
    file: 'assessments/[id]/rooms/[roomId].ts',
    method: 'GET',
    path: (c) => `/api/assessments/${UNKNOWN_RUN}/rooms/${c.demoRoomId}`,
    expect: signedIn(404),
  },
  {
    file: 'assessments/[id]/rooms/[roomId].ts',
    method: 'GET',
    path: (c) => `/api/assessments/${c.trustRunId}/rooms/${c.demoRoomId}`,
    expect: { ...signedIn(200), school_limited: 404, other_trust: 404 },
    note: "a room as the run saw it: another school's room is not found for a member limited to one school",
  },
  { file: 'assessments/retention.ts', method: 'GET', path: '/api/assessments/retention', expect: signedIn(200) },
  {
    file: 'assessments/retention.ts',
    method: 'PUT',
    path: '/api/assessments/retention',
    body: { keepRuns: 0 },
    expect: {
      anonymous: 401,
      viewer: 403,
      finance_lead: 403,
      estates_manager: 403,
      school_limited: 403,
      trust_admin: 400,
      other_trust: 400,
    },
    note: 'only a trust admin sets how long results are kept; keeping none is refused, so nothing is pruned',
  },
  { file: 'exports/results.xlsx.ts', method: 'GET', path: '/api/exports/results.xlsx', expect: signedIn(200) },
  {
    file: 'rooms/[id]/what-if.ts',
    method: 'POST',
    path: (c) => `/api/rooms/${c.demoRoomId}/what-if`,
    body: { pupils: 12 },
    expect: {
      anonymous: 401,
      viewer: 200,
      finance_lead: 200,
      estates_manager: 200,
      school_limited: 404,
      trust_admin: 200,
      other_trust: 404,
    },
    note: "reading is enough: a what-if saves nothing; another school's room is not found for a school-limited member",
  },
  { file: 'assumptions/index.ts', method: 'GET', path: '/api/assumptions', expect: signedIn(200) },
  {
    file: 'assumptions/index.ts',
    method: 'PATCH',
    path: '/api/assumptions',
    body: { changes: [{ path: 'air.outdoorCo2Ppm', value: 'not a number' }] },
    expect: {
      anonymous: 401,
      viewer: 403,
      finance_lead: 403,
      estates_manager: 400,
      school_limited: 403,
      trust_admin: 400,
      other_trust: 400,
    },
    note: 'outdoor CO2 is technical: finance leads may not change it; assumptions apply trust-wide, so a school-limited member may not either; for the others the value is refused',
  },
  { file: 'unit-models/index.ts', method: 'GET', path: '/api/unit-models', expect: signedIn(200) },
  {
    file: 'unit-models/index.ts',
    method: 'PUT',
    path: '/api/unit-models',
    body: { models: [] },
    expect: {
      anonymous: 401,
      viewer: 403,
      finance_lead: 400,
      estates_manager: 400,
      school_limited: 403,
      trust_admin: 400,
      other_trust: 400,
    },
    note: 'an empty catalogue is refused after the permission check; the catalogue is trust-wide, so a school-limited member may not change it',
  },
];
