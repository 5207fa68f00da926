import { signedIn, type MatrixEntry } from './types';

/**
 * The capital programme API: every role reads and exports programmes; estates managers, finance leads and
 * trust admins create and change them; viewers are refused before anything is looked up. Ids here are unknown
 * (programmes of the demo trust are made in programme-api.test.ts, which checks the same rules on real ones),
 * so a permitted caller gets 404 and nothing changes; another trust's admin never sees the demo trust's.
 */
const UNKNOWN = '00000000-0000-4000-8000-00000000f00d';
const editors = (status: number) => ({
  anonymous: 401,
  viewer: 403,
  finance_lead: status,
  estates_manager: status,
  school_limited: status,
  trust_admin: status,
  other_trust: status,
});

export const entries: MatrixEntry[] = [
  { file: 'programmes/index.ts', method: 'GET', path: '/api/programmes', expect: signedIn(200) },
  {
    file: 'programmes/index.ts',
    method: 'POST',
    path: '/api/programmes',
    body: { name: '', settings: {} },
    expect: editors(400),
    note: 'an empty name and settings are refused after the permission check, so nothing is made',
  },
  {
    file: 'programmes/compare.ts',
    method: 'GET',
    path: `/api/programmes/compare?ids=${UNKNOWN},${UNKNOWN.replace('f00d', 'f00e')}`,
    expect: signedIn(404),
  },
  { file: 'programmes/[id]/index.ts', method: 'GET', path: `/api/programmes/${UNKNOWN}`, expect: signedIn(404) },
  {
    file: 'programmes/[id]/index.ts',
    method: 'PUT',
    path: `/api/programmes/${UNKNOWN}`,
    body: { name: 'Renamed' },
    expect: editors(404),
  },
  { file: 'programmes/[id]/index.ts', method: 'DELETE', path: `/api/programmes/${UNKNOWN}`, expect: editors(404) },
  {
    file: 'programmes/[id]/edits.ts',
    method: 'POST',
    path: `/api/programmes/${UNKNOWN}/edits`,
    body: { action: 'unpin', roomId: UNKNOWN },
    expect: editors(404),
  },
  {
    file: 'programmes/[id]/refresh.ts',
    method: 'POST',
    path: `/api/programmes/${UNKNOWN}/refresh`,
    body: {},
    expect: editors(404),
  },
  {
    file: 'programmes/[id]/programme.xlsx.ts',
    method: 'GET',
    path: `/api/programmes/${UNKNOWN}/programme.xlsx`,
    expect: signedIn(404),
  },
  {
    file: 'programmes/[id]/report.pdf.ts',
    method: 'GET',
    path: `/api/programmes/${UNKNOWN}/report.pdf`,
    expect: signedIn(404),
  },
  {
    file: 'programmes/[id]/bid-pack.pdf.ts',
    method: 'GET',
    path: (c) => `/api/programmes/${UNKNOWN}/bid-pack.pdf?schoolId=${c.demoSchoolId}`,
    expect: signedIn(404),
  },
];
