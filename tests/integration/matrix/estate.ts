import { all, signedIn, writers, type MatrixEntry } from './types';

/** The estate API: every role reads; another trust never sees the demo trust's rows. */
export const entries: MatrixEntry[] = [
  { file: 'health.ts', method: 'GET', path: '/api/health', expect: all(200), note: 'public liveness check' },
  {
    file: 'schools/index.ts',
    method: 'GET',
    path: '/api/schools',
    expect: signedIn(200),
    note: 'the other trust sees its own (empty) list',
  },
  {
    file: 'schools/[id].ts',
    method: 'GET',
    path: (c) => `/api/schools/${c.demoSchoolId}`,
    expect: { ...signedIn(200), school_limited: 404, other_trust: 404 },
  },
  {
    file: 'schools/[id].ts',
    method: 'GET',
    path: (c) => `/api/schools/${c.limitedSchoolId}`,
    expect: { ...signedIn(200), other_trust: 404 },
    note: 'the school-limited member reads their own school',
  },
  {
    file: 'schools/[id].ts',
    method: 'DELETE',
    path: '/api/schools/00000000-0000-4000-8000-00000000dead',
    expect: { ...writers(404), school_limited: 403 },
    note: 'an unknown school: nothing is removed; members limited to chosen schools may not remove schools at all',
  },
  {
    file: 'schools/[id]/removal.ts',
    method: 'GET',
    path: (c) => `/api/schools/${c.demoSchoolId}/removal`,
    expect: writers(200, 404, 404),
    note: 'what removal would take; the school-limited member cannot see the other school',
  },
  { file: 'rooms/index.ts', method: 'GET', path: '/api/rooms', expect: signedIn(200) },
  {
    file: 'rooms/[id].ts',
    method: 'GET',
    path: (c) => `/api/rooms/${c.demoRoomId}`,
    expect: { ...signedIn(200), school_limited: 404, other_trust: 404 },
  },
];
