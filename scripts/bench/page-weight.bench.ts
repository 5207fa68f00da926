/**
 * The JavaScript each page ships, gzipped: every script and modulepreload in the served HTML, each island's
 * component-url and renderer-url, and everything those files import (statically or lazily), read from the
 * build's client folder. Pages whose JS includes the chart library count as chart pages.
 * Prints { page_js_kb_max, chart_page_js_kb_max, ... } as its last line.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, normalize, relative } from 'node:path';
import { gzipSync } from 'node:zlib';
import { createDb } from '../../src/lib/server/db/client';
import { insertAssessedRooms } from '../../tests/integration/portfolio-fixture';
import { api, signUp } from '../../tests/helpers/session';

const APP_URL = (process.env.APP_URL ?? '').replace(/\/$/, '');
const DIST = process.env.BENCH_DIST_DIR ?? '';
const DATABASE_URL = process.env.DATABASE_URL ?? '';
if (!APP_URL || !DIST || !DATABASE_URL)
  throw new Error('Run through `npm run bench` (APP_URL and BENCH_DIST_DIR are needed).');
const CLIENT = join(DIST, 'client');
const log = (message: string) => console.error(`[page-weight.bench] ${message}`);

/** The signed-in pages of the app (others' pages are measured too when they exist). */
const PAGES = [
  '/app',
  '/app/priorities',
  '/app/finance',
  '/app/schools',
  '/app/register',
  '/app/assessments',
  '/app/settings',
  '/app/account',
];

/**
 * Signs up a trust admin of a new trust (as a person would: sign-up answers 202 and sends a confirmation e-mail last;
 * the account signs in unconfirmed) and gives it a small assessed estate, so every page renders its full interface
 * (charts included) rather than an empty state.
 */
async function signUpWithResults(): Promise<string> {
  const email = `page-weight-${Date.now()}@bench.airtally.test`;
  const cookie = await signUp({
    name: 'Bench Admin',
    email,
    password: 'bench-password-2026',
    trustName: 'Bench Page Weight Trust',
  });
  const account = (await (await api('/api/account', { cookie })).json()) as { trust: { id: string } | null };
  if (!account.trust) throw new Error(`The bench account ${email} has no trust`);
  const db = createDb(DATABASE_URL);
  try {
    await insertAssessedRooms(db, {
      trustId: account.trust.id,
      createTrust: false,
      schools: 3,
      roomsPerSchool: 30,
      label: 'Page Weight',
    });
  } finally {
    await db.destroy();
  }
  return cookie;
}

/** A URL path of the site (/_astro/x.js) to its file in the client build, or null when it is not ours. */
function fileOf(urlPath: string, fromFile?: string): string | null {
  let path: string;
  if (urlPath.startsWith('./') || urlPath.startsWith('../')) {
    if (!fromFile) return null;
    path = normalize(join(dirname(fromFile), urlPath));
  } else if (urlPath.startsWith('/')) {
    path = join(CLIENT, urlPath.split('?')[0]!);
  } else if (urlPath.startsWith('_astro/')) {
    path = join(CLIENT, urlPath);
  } else {
    try {
      const url = new URL(urlPath);
      if (`${url.protocol}//${url.host}` !== APP_URL) return null;
      path = join(CLIENT, url.pathname);
    } catch {
      return null;
    }
  }
  return path.endsWith('.js') && existsSync(path) ? path : null;
}

/** The file and every .js file it names (static imports, lazy imports, Vite's preload lists), transitively. */
function closure(entries: string[]): Set<string> {
  const seen = new Set<string>();
  const queue = [...entries];
  while (queue.length > 0) {
    const file = queue.pop()!;
    if (seen.has(file)) continue;
    seen.add(file);
    const source = readFileSync(file, 'utf8');
    for (const match of source.matchAll(/["'`]((?:\.{1,2}\/|\/_astro\/|_astro\/)[^"'`]+?\.js)["'`]/g)) {
      const next = fileOf(match[1]!, file);
      if (next && !seen.has(next)) queue.push(next);
    }
  }
  return seen;
}

const cookie = await signUpWithResults();
const gzCache = new Map<string, number>();
const gzBytes = (file: string) => {
  let n = gzCache.get(file);
  if (n === undefined) {
    n = gzipSync(readFileSync(file), { level: 9 }).length;
    gzCache.set(file, n);
  }
  return n;
};

const perPage: Record<string, { kb: number; chart: boolean; files: number }> = {};
for (const path of PAGES) {
  const response = await fetch(`${APP_URL}${path}`, { headers: { cookie }, redirect: 'manual' });
  if (response.status !== 200) {
    log(`${path}: ${response.status}, skipped`);
    continue;
  }
  const html = await response.text();
  const refs = [
    ...[...html.matchAll(/<script[^>]*\ssrc="([^"]+)"/g)].map((m) => m[1]!),
    ...[...html.matchAll(/<link[^>]*rel="modulepreload"[^>]*href="([^"]+)"/g)].map((m) => m[1]!),
    ...[...html.matchAll(/\s(?:component-url|renderer-url)="([^"]+)"/g)].map((m) => m[1]!),
  ];
  const files = closure(refs.map((r) => fileOf(r)).filter((f): f is string => f !== null));
  // Inline scripts ship too (Astro's island loader, the theme switch).
  const inline = [...html.matchAll(/<script(?![^>]*\ssrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]!).join('\n');
  const bytes = [...files].reduce((s, f) => s + gzBytes(f), 0) + (inline ? gzipSync(inline, { level: 9 }).length : 0);
  const chart = [...files].some((f) => /PortfolioChart/.test(f) || readFileSync(f, 'utf8').includes('ag-charts'));
  perPage[path] = { kb: Math.round((bytes / 1024) * 10) / 10, chart, files: files.size };
  log(
    `${path}: ${perPage[path]!.kb} KB gzipped in ${files.size} files${chart ? ' (charts)' : ''}: ${[...files].map((f) => relative(CLIENT, f)).join(', ')}`,
  );
}

const plain = Object.values(perPage)
  .filter((p) => !p.chart)
  .map((p) => p.kb);
const charted = Object.values(perPage)
  .filter((p) => p.chart)
  .map((p) => p.kb);
console.log(
  JSON.stringify({
    page_js_kb_max: plain.length ? Math.max(...plain) : 0,
    chart_page_js_kb_max: charted.length ? Math.max(...charted) : 0,
    page_js_kb_by_page: Object.fromEntries(Object.entries(perPage).map(([k, v]) => [k, v.kb])),
  }),
);
