import { signedIn, type MatrixEntry } from './types';

/**
 * The portfolio API: every role reads and exports; only trust admins and estates managers save ranking
 * weights. Another trust's admin reads its own (empty) portfolio, never the demo trust's rooms.
 */
export const entries: MatrixEntry[] = [
  {
    file: 'priorities/index.ts',
    method: 'GET',
    path: '/api/priorities',
    expect: signedIn(200),
    note: 'the other trust sees its own empty list',
  },
  {
    file: 'priorities/index.ts',
    method: 'GET',
    path: (c) => `/api/priorities?schoolId=${c.demoSchoolId}`,
    expect: signedIn(200),
    note: "filtering by another trust's (or another school's) school returns no rows, not an error (checked in portfolio-api.test.ts)",
  },
  { file: 'priorities/weights.ts', method: 'GET', path: '/api/priorities/weights', expect: signedIn(200) },
  {
    file: 'priorities/weights.ts',
    method: 'PUT',
    path: '/api/priorities/weights',
    body: { risk: 0, costEffectiveness: 0, payback: 0 },
    expect: {
      anonymous: 401,
      viewer: 403,
      finance_lead: 403,
      estates_manager: 400,
      school_limited: 403,
      trust_admin: 400,
      other_trust: 400,
    },
    note: 'all-zero weights are refused after the permission check, so nothing is saved; the weights rank the whole trust, so a school-limited member may not save them',
  },
  { file: 'finance/index.ts', method: 'GET', path: '/api/finance', expect: signedIn(200) },
  { file: 'dashboard/index.ts', method: 'GET', path: '/api/dashboard', expect: signedIn(200) },
  { file: 'exports/priorities.xlsx.ts', method: 'GET', path: '/api/exports/priorities.xlsx', expect: signedIn(200) },
];
