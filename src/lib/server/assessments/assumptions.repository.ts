import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../../../../db/database';
import { completeAssumptionSet, DEFAULT_ASSUMPTIONS, type AssumptionSet } from '../../engine';

type Db = Kysely<Database> | Transaction<Database>;

/** One stored version of a trust's assumption set. */
export interface StoredAssumptionSet {
  id: string;
  trustId: string;
  version: number;
  label: string;
  set: AssumptionSet;
  changeSummary: string;
  createdByEmail: string | null;
  createdAt: string;
}

/** A version in the history list (without the values). */
export interface AssumptionVersionSummary {
  id: string;
  version: number;
  label: string;
  changeSummary: string;
  createdByEmail: string | null;
  createdAt: string;
}

/** The version string results record: the shipped defaults it started from, plus the trust's version number. */
export const versionLabel = (version: number) => `${DEFAULT_ASSUMPTIONS.version}+trust.${version}`;

type Row = Database['assumption_sets'] extends infer T ? { [K in keyof T]: unknown } : never;

const toStored = (row: Row): StoredAssumptionSet => ({
  id: row.id as string,
  trustId: row.trust_id as string,
  version: row.version as number,
  label: row.label as string,
  // Versions saved by an older release run: assumptions added since come from the defaults, retired ones are left out.
  set: completeAssumptionSet(row.values as AssumptionSet, DEFAULT_ASSUMPTIONS).set,
  changeSummary: row.change_summary as string,
  createdByEmail: row.created_by_email as string | null,
  createdAt: (row.created_at as Date).toISOString(),
});

/** The trust's newest assumption set; version 1 (the shipped defaults) is written the first time it is needed. */
export async function getCurrentAssumptionSet(db: Db, trustId: string): Promise<StoredAssumptionSet> {
  const latest = await db
    .selectFrom('assumption_sets')
    .selectAll()
    .where('trust_id', '=', trustId)
    .orderBy('version', 'desc')
    .limit(1)
    .executeTakeFirst();
  if (latest) return toStored(latest);
  const label = versionLabel(1);
  const values: AssumptionSet = { ...structuredClone(DEFAULT_ASSUMPTIONS), version: label };
  await db
    .insertInto('assumption_sets')
    .values({
      trust_id: trustId,
      version: 1,
      label,
      values: JSON.stringify(values),
      change_summary: 'Airtally defaults',
    })
    .onConflict((oc) => oc.constraint('assumption_sets_version_unique_in_trust').doNothing())
    .execute();
  return getCurrentAssumptionSet(db, trustId);
}

/** One version by id, within the trust. */
export async function getAssumptionSetById(db: Db, trustId: string, id: string): Promise<StoredAssumptionSet | null> {
  const row = await db
    .selectFrom('assumption_sets')
    .selectAll()
    .where('trust_id', '=', trustId)
    .where('id', '=', id)
    .executeTakeFirst();
  return row ? toStored(row) : null;
}

/** Every version of the trust's set, newest first. */
export async function listAssumptionVersions(db: Db, trustId: string): Promise<AssumptionVersionSummary[]> {
  const rows = await db
    .selectFrom('assumption_sets')
    .select(['id', 'version', 'label', 'change_summary', 'created_by_email', 'created_at'])
    .where('trust_id', '=', trustId)
    .orderBy('version', 'desc')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    version: r.version,
    label: r.label,
    changeSummary: r.change_summary,
    createdByEmail: r.created_by_email,
    createdAt: r.created_at.toISOString(),
  }));
}

/** Writes a new version; the unique (trust, version) constraint turns a concurrent edit into a 409. */
export async function insertAssumptionVersion(
  db: Db,
  input: {
    trustId: string;
    version: number;
    set: AssumptionSet;
    changeSummary: string;
    userId: string | null;
    email: string | null;
  },
): Promise<StoredAssumptionSet> {
  const row = await db
    .insertInto('assumption_sets')
    .values({
      trust_id: input.trustId,
      version: input.version,
      label: input.set.version,
      values: JSON.stringify(input.set),
      change_summary: input.changeSummary,
      created_by_user_id: input.userId,
      created_by_email: input.email,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
  return toStored(row);
}
