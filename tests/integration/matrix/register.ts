import { signedIn, writers, type MatrixEntry } from './types';

// An id that exists nowhere, so write entries change nothing.
const NOBODY = '00000000-0000-4000-8000-000000000000';

/**
 * The register API: everyone signed in reads the import history, the template and exports; only
 * estates managers and trust admins import and edit. Write bodies are invalid or aim at unknown ids.
 */
export const entries: MatrixEntry[] = [
  {
    file: 'imports/index.ts',
    method: 'GET',
    path: '/api/imports',
    expect: signedIn(200),
    note: 'each trust sees its own history',
  },
  {
    file: 'imports/index.ts',
    method: 'POST',
    path: '/api/imports',
    body: {},
    expect: writers(400),
    note: 'no multipart file: refused after the permission check',
  },
  { file: 'imports/[id]/index.ts', method: 'GET', path: `/api/imports/${NOBODY}`, expect: signedIn(404) },
  {
    file: 'imports/[id]/index.ts',
    method: 'GET',
    path: (c) => `/api/imports/${c.foreignImportId}`,
    expect: { ...signedIn(200), school_limited: 404, other_trust: 404 },
    note: "the trust admin's import lists missing rooms of every school: a school-limited member sees only their own imports",
  },
  {
    file: 'imports/[id]/rejected.xlsx.ts',
    method: 'GET',
    path: `/api/imports/${NOBODY}/rejected.xlsx`,
    expect: writers(404),
    note: 'the rejected rows of an import that does not exist',
  },
  {
    file: 'imports/[id]/rejected.xlsx.ts',
    method: 'GET',
    path: (c) => `/api/imports/${c.foreignImportId}/rejected.xlsx`,
    expect: writers(404, 404, 404),
    note: "the trust admin's preview rejected no rows (nothing to download); another member limited to a school, or another trust, may not see it at all",
  },
  {
    file: 'imports/[id]/commit.ts',
    method: 'POST',
    path: `/api/imports/${NOBODY}/commit`,
    body: { rows: 'none' },
    expect: writers(404),
  },
  {
    file: 'imports/[id]/commit.ts',
    method: 'POST',
    path: (c) => `/api/imports/${c.foreignImportId}/commit`,
    body: { rows: 'none' },
    expect: { ...writers(200, 404, 404), trust_admin: 409 },
    note: "the estates manager cancels the preview (the estate is untouched), so it is no longer open for the trust admin; a school-limited member may not touch another member's preview",
  },
  {
    file: 'exports/register.xlsx.ts',
    method: 'GET',
    path: '/api/exports/register.xlsx',
    expect: signedIn(200),
    note: 'viewers and finance leads may export',
  },
  { file: 'exports/register.csv.ts', method: 'GET', path: '/api/exports/register.csv', expect: signedIn(200) },
  { file: 'templates/register.xlsx.ts', method: 'GET', path: '/api/templates/register.xlsx', expect: signedIn(200) },
  { file: 'rooms/index.ts', method: 'POST', path: '/api/rooms', body: {}, expect: writers(400) },
  {
    file: 'rooms/[id].ts',
    method: 'PATCH',
    path: (c) => `/api/rooms/${c.demoRoomId}`,
    body: {},
    expect: writers(200, 404, 404),
    note: 'an empty patch changes nothing; another trust, or a member limited to another school, gets 404',
  },
  { file: 'rooms/[id].ts', method: 'DELETE', path: `/api/rooms/${NOBODY}`, expect: writers(404) },
  {
    file: 'rooms/bulk.ts',
    method: 'POST',
    path: '/api/rooms/bulk',
    body: { action: 'update', ids: [NOBODY], changes: {} },
    expect: writers(404),
  },
  {
    file: 'schools/[id].ts',
    method: 'PATCH',
    path: (c) => `/api/schools/${c.demoSchoolId}`,
    body: {},
    expect: writers(200, 404, 404),
  },
  { file: 'blocks/index.ts', method: 'POST', path: '/api/blocks', body: {}, expect: writers(400) },
  { file: 'blocks/[id].ts', method: 'PATCH', path: `/api/blocks/${NOBODY}`, body: {}, expect: writers(404) },
  { file: 'blocks/[id].ts', method: 'DELETE', path: `/api/blocks/${NOBODY}`, expect: writers(404) },
];
