import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ROLE_LABELS, ROLES } from '../../src/lib/server/auth/context';
import { can } from '../../src/lib/server/auth/permissions';

// The README's table of demo accounts says what each role can do; it must agree with permissions.ts.
const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const rowOf = (role: (typeof ROLES)[number]) => {
  const row = readme.split('\n').find((line) => line.split('|')[2]?.trim() === ROLE_LABELS[role]);
  if (!row) throw new Error(`README has no row for ${ROLE_LABELS[role]}`);
  return row.split('|')[3]?.trim() ?? '';
};

describe("README's roles table", () => {
  it.each(ROLES.filter((r) => r !== 'trust_admin'))(
    'says whether a %s may start a run as permissions.ts does',
    (role) => {
      expect(rowOf(role).includes('run assessments')).toBe(can(role, 'assessment', 'run'));
    },
  );

  it.each(ROLES.filter((r) => r !== 'trust_admin'))(
    'says whether a %s may import the register as permissions.ts does',
    (role) => {
      expect(rowOf(role).includes('import the register')).toBe(can(role, 'register', 'import'));
    },
  );

  it.each(ROLES.filter((r) => r !== 'trust_admin'))('says whether a %s may export as permissions.ts does', (role) => {
    expect(/export/.test(rowOf(role))).toBe(can(role, 'register', 'export'));
  });
});
