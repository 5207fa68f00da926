/** The register import's own table: the trust's remembered header → field mappings. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { RegisterField } from './columns';
import type { SavedMappings } from './headers';

/** The trust's remembered header → field mappings. */
export async function loadSavedMappings(db: Kysely<Database>, trustId: string): Promise<SavedMappings> {
  const rows = await db
    .selectFrom('register_column_mappings')
    .select(['header_key', 'field'])
    .where('trust_id', '=', trustId)
    .execute();
  return new Map(rows.map((r) => [r.header_key, r.field as RegisterField]));
}

/** Remembers the user's mapping of these headers for the trust's next import. */
export async function saveMappings(
  db: Kysely<Database>,
  trustId: string,
  pairs: { headerKey: string; field: RegisterField }[],
): Promise<void> {
  const values = pairs
    .filter((p) => p.headerKey !== '')
    .map((p) => ({ trust_id: trustId, header_key: p.headerKey, field: p.field }));
  if (!values.length) return;
  await db
    .insertInto('register_column_mappings')
    .values(values)
    .onConflict((oc) =>
      oc
        .columns(['trust_id', 'header_key'])
        .doUpdateSet({ field: (eb) => eb.ref('excluded.field'), updated_at: sql`now()` }),
    )
    .execute();
}
