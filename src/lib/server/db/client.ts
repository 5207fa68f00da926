import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import type { Database } from '../../../../db/database';
import { config } from '../config';

// double precision and bigint columns come back as JS numbers; counts are well below 2^53.
pg.types.setTypeParser(pg.types.builtins.INT8, (value: string) => Number(value));
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (value: string) => Number(value));

let pool: pg.Pool | undefined;
let instance: Kysely<Database> | undefined;

/** The shared pg pool (also handed to better-auth and pg-boss so there is one pool per process). */
export function getPool(): pg.Pool {
  pool ??= new pg.Pool({ connectionString: config().DATABASE_URL, max: 10 });
  return pool;
}

/** The process-wide Kysely instance. */
export function getDb(): Kysely<Database> {
  instance ??= new Kysely<Database>({ dialect: new PostgresDialect({ pool: getPool() }) });
  return instance;
}

/** Creates a separate Kysely instance for a given URL (scripts and tests). */
export function createDb(connectionString: string): Kysely<Database> {
  return new Kysely<Database>({
    dialect: new PostgresDialect({ pool: new pg.Pool({ connectionString, max: 5 }) }),
  });
}
