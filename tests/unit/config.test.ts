import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { configProblems, parseConfig } from '../../src/lib/server/config';

const SECRET = 'f3a9c27e5b1d48e6a0c4b7d2e9f1a6c3b8d5e2f7a4c1b9e6d3f0a7c4b1e8d5f2';

describe('configuration', () => {
  it('is read from the environment in one module only', () => {
    const src = join(process.cwd(), 'src');
    const files = (dir: string): string[] =>
      readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
        e.isDirectory()
          ? files(join(dir, e.name))
          : /\.(ts|tsx|mts|cts|js|jsx|mjs|cjs|astro)$/.test(e.name)
            ? [join(dir, e.name)]
            : [],
      );
    const readers = files(src)
      .filter((f) => /process\.env|import\.meta\.env/.test(readFileSync(f, 'utf8')))
      .map((f) => relative(process.cwd(), f));
    expect(readers).toEqual(['src/lib/server/config.ts']);
  });

  it('lets a loopback development server start without a secret', () => {
    expect(configProblems(parseConfig({ NODE_ENV: 'development', HOST: '127.0.0.1', PORT: '4321' }))).toEqual([]);
  });

  it.each([
    ['in production', { NODE_ENV: 'production' }],
    ['listening on every interface', { HOST: '0.0.0.0' }],
    ['listening on a LAN address', { HOST: '192.168.1.20' }],
    ['served at a public origin', { PUBLIC_ORIGIN: 'https://airtally.example-trust.test' }],
  ])('refuses a missing auth secret %s', (_label, env) => {
    expect(configProblems(parseConfig(env)).join('\n')).toMatch(/BETTER_AUTH_SECRET is not set/);
  });

  it('refuses the auth secret once published in this repository, even on loopback', () => {
    const env = { BETTER_AUTH_SECRET: 'airtally-loopback-only-development-secret-do-not-use-in-production' };
    expect(configProblems(parseConfig(env)).join('\n')).toMatch(/published/);
  });

  it('refuses a predictable auth secret', () => {
    expect(configProblems(parseConfig({ BETTER_AUTH_SECRET: 'a'.repeat(40) })).join('\n')).toMatch(/predictable/);
  });

  it('accepts a random secret in production', () => {
    expect(
      configProblems(parseConfig({ NODE_ENV: 'production', HOST: '0.0.0.0', BETTER_AUTH_SECRET: SECRET })),
    ).toEqual([]);
  });

  it('names the variable that is malformed', () => {
    expect(() => parseConfig({ PORT: 'eighty' })).toThrow(/PORT|number/);
    expect(() => parseConfig({ BETTER_AUTH_SECRET: 'short' })).toThrow(/at least 32 characters/);
  });
});
