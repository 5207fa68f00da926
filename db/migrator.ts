import { promises as fs } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Migrator, type Kysely, type Migration, type MigrationProvider } from 'kysely';

const MIGRATIONS_DIR = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

/**
 * Loads every timestamped file in db/migrations. Kysely's own FileMigrationProvider imports
 * natively, which cannot load .ts under vitest; importing from here lets tsx and vitest compile them.
 */
const folderProvider: MigrationProvider = {
  async getMigrations() {
    const files = (await fs.readdir(MIGRATIONS_DIR))
      .filter((f) => /\.(ts|js|mjs)$/.test(f) && !f.endsWith('.d.ts'))
      .sort();
    const migrations: Record<string, Migration> = {};
    for (const file of files) {
      const module = (await import(pathToFileURL(path.join(MIGRATIONS_DIR, file)).href)) as Migration;
      migrations[file.replace(/\.(ts|js|mjs)$/, '')] = { up: module.up, ...(module.down ? { down: module.down } : {}) };
    }
    return migrations;
  },
};

/** A Kysely migrator over the timestamped files in db/migrations. */
export function createMigrator(db: Kysely<any>): Migrator {
  // Features add migrations in parallel branches; a database that already ran a later one must still accept them.
  return new Migrator({ db, provider: folderProvider, allowUnorderedMigrations: true });
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
