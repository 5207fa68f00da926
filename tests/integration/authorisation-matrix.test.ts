import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { bodyText, leaked, schoolLimitedFixture, type SchoolLimitedFixture } from '../helpers/school-limited';
import { DEMO_ACCOUNTS, api, createOtherTrust, signIn, uniqueEmail } from '../helpers/session';
import { ACTORS, type Actor, type MatrixContext, type MatrixEntry } from './matrix/types';

const API_DIR = join(process.cwd(), 'src', 'pages', 'api');
const MATRIX_DIR = join(process.cwd(), 'tests', 'integration', 'matrix');

/** Every route file under src/pages/api with the HTTP methods it exports. */
function apiRoutes(dir = API_DIR): { file: string; methods: string[] }[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return apiRoutes(path);
    if (!/\.(ts|js|mjs)$/.test(entry.name)) return [];
    const source = readFileSync(path, 'utf8');
    const methods = [
      ...source.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE|ALL)\b/g),
    ].map((m) => m[1] ?? '');
    return [{ file: relative(API_DIR, path).split('\\').join('/'), methods }];
  });
}

/** Every feature's matrix entries (tests/integration/matrix/*.ts except types.ts). */
async function loadEntries(): Promise<MatrixEntry[]> {
  const files = readdirSync(MATRIX_DIR)
    .filter((f) => f.endsWith('.ts') && f !== 'types.ts')
    .sort();
  const modules = await Promise.all(
    files.map((f) => import(pathToFileURL(join(MATRIX_DIR, f)).href) as Promise<{ entries?: MatrixEntry[] }>),
  );
  return modules.flatMap((m, i) => {
    if (!Array.isArray(m.entries))
      throw new Error(`tests/integration/matrix/${files[i]} must export entries: MatrixEntry[]`);
    return m.entries;
  });
}

const entries = await loadEntries();

describe('authorisation matrix', () => {
  it('has an entry for every API route file and every method it exports', () => {
    const missing = apiRoutes().flatMap(({ file, methods }) => {
      const covered = entries.filter((e) => e.file === file);
      if (covered.length === 0) return [`${file} (no entry at all)`];
      return methods.filter((m) => m !== 'ALL' && !covered.some((e) => e.method === m)).map((m) => `${m} ${file}`);
    });
    expect(missing, 'add these to a file in tests/integration/matrix/').toEqual([]);
  });

  it('names only route files that exist', () => {
    const files = new Set(apiRoutes().map((r) => r.file));
    expect(entries.map((e) => e.file).filter((f) => !files.has(f))).toEqual([]);
  });

  const cookies = {} as Record<Actor, string | undefined>;
  let context: MatrixContext;
  let limited: SchoolLimitedFixture;
  const db = testDb();
  beforeAll(async () => {
    cookies.anonymous = undefined;
    for (const role of ['viewer', 'finance_lead', 'estates_manager', 'trust_admin'] as const)
      cookies[role] = await signIn(DEMO_ACCOUNTS[role]);
    const other = await createOtherTrust();
    cookies.other_trust = other.cookie;
    limited = await schoolLimitedFixture(db);
    cookies.school_limited = limited.cookie;
    context = {
      demoSchoolId: limited.otherSchoolId,
      demoRoomId: limited.otherRoomId,
      limitedSchoolId: limited.allowedSchoolId,
      foreignImportId: limited.foreignImportId,
      otherSchoolRunId: limited.otherSchoolRunId,
      trustRunId: limited.trustRunId,
      otherTrustId: other.trustId,
      uniqueEmail: () => uniqueEmail('matrix'),
    };
  }, 300_000);
  afterAll(async () => {
    await limited?.cleanup();
    await db.destroy();
  });

  for (const entry of entries) {
    const label = `${entry.method} ${typeof entry.path === 'string' ? entry.path : entry.file}`;
    it(`${label} answers each actor as the matrix says`, async () => {
      const actual = {} as Record<Actor, number>;
      for (const actor of ACTORS) {
        const path = typeof entry.path === 'function' ? entry.path(context) : entry.path;
        const body =
          typeof entry.body === 'function' ? (entry.body as (c: MatrixContext) => unknown)(context) : entry.body;
        const cookie = cookies[actor];
        const response = await api(path, {
          method: entry.method,
          ...(cookie ? { cookie } : {}),
          ...(body === undefined ? {} : { body: JSON.stringify(body) }),
        });
        actual[actor] = response.status;
        if (response.status >= 400 && response.status !== 404) {
          const text = await response.text();
          if (text) expect(JSON.parse(text), `${label} as ${actor}: error shape`).toHaveProperty('error.message');
        }
        if (actor === 'school_limited' && response.ok)
          expect(leaked(await bodyText(response), limited.forbidden), `${label}: other schools leaked`).toEqual([]);
      }
      expect(actual).toEqual(entry.expect);
    });
  }
});
