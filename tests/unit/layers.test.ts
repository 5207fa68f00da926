/** Imports point one way (DEVELOPERS.md): pages → lib/server → db; everything may use lib/engine; db uses no app code. */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = process.cwd();
const files = (dir: string): string[] =>
  readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? files(join(dir, e.name)) : /\.(ts|tsx|mts|mjs|astro)$/.test(e.name) ? [join(dir, e.name)] : [],
  );

/** Every relative import of every file under `dir`, resolved to a path from the repository root. */
function importsUnder(dir: string): { file: string; target: string }[] {
  return files(join(ROOT, dir)).flatMap((file) =>
    [...readFileSync(file, 'utf8').matchAll(/(?:from|import)\s*\(?\s*'(\.{1,2}\/[^']+)'/g)].map((m) => ({
      file: relative(ROOT, file),
      target: relative(ROOT, resolve(dirname(file), m[1] as string)),
    })),
  );
}

describe('import directions', () => {
  it('db/ imports nothing from src/lib/server', () => {
    expect(importsUnder('db').filter((i) => i.target.startsWith('src/lib/server'))).toEqual([]);
  });

  it('migrations import nothing from src/ (they are frozen in time)', () => {
    expect(importsUnder('db/migrations').filter((i) => i.target.startsWith('src'))).toEqual([]);
  });

  it('lib/engine imports nothing of ours but itself', () => {
    expect(importsUnder('src/lib/engine').filter((i) => !i.target.startsWith('src/lib/engine'))).toEqual([]);
  });

  it('lib/server imports no pages, components or islands', () => {
    expect(
      importsUnder('src/lib/server').filter((i) => /^src\/(pages|components|islands|layouts)\//.test(i.target)),
    ).toEqual([]);
  });
});

describe('the database handle', () => {
  it('is obtained by routes, pages and job entry points and passed down; lib/server never reaches for it mid-call', () => {
    const reach = files(join(ROOT, 'src/lib/server'))
      .filter((f) => /\b(getDb|getPool)\(\)/.test(readFileSync(f, 'utf8')))
      .map((f) => relative(ROOT, f))
      .sort();
    expect(reach).toEqual([
      // Job entry points: the queues' workers take the process's handles and pass them down.
      'src/lib/server/assessments/queue.ts',
      // The better-auth instance is built once on the process's Kysely (the library keeps its own handle).
      'src/lib/server/auth/auth.ts',
      'src/lib/server/db/client.ts',
      'src/lib/server/monitor-logs/analysis.service.ts',
    ]);
  });
});
