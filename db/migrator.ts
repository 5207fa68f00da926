import { promises as fs } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { FileMigrationProvider, Migrator, type Kysely } from 'kysely';

const MIGRATIONS_DIR = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

/** A Kysely migrator over the timestamped files in db/migrations. */
export function createMigrator(db: Kysely<any>): Migrator {
  return new Migrator({
    db,
    provider: new FileMigrationProvider({ fs, path, migrationFolder: MIGRATIONS_DIR }),
  });
}

/** Runs all pending migrations; throws with the failing migration's name when one fails. */
export async function migrateToLatest(db: Kysely<any>): Promise<string[]> {
  const { error, results } = await createMigrator(db).migrateToLatest();
  const failed = results?.find((r) => r.status === 'Error');
  if (error || failed) {
    const cause = error instanceof Error ? error.message : String(error);
    throw new Error(`Migration ${failed?.migrationName ?? '(unknown)'} failed: ${cause}`);
  }
  return (results ?? []).map((r) => r.migrationName);
}

/** Reverts every migration, newest first (used by the migration round-trip test). */
export async function migrateDownToZero(db: Kysely<any>): Promise<void> {
  const migrator = createMigrator(db);
  for (;;) {
    const { error, results } = await migrator.migrateDown();
    if (error) throw error instanceof Error ? error : new Error(String(error));
    if (!results || results.length === 0) return;
  }
}
