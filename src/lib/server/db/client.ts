import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import type { Database } from '../../../../db/database';
import { config } from '../config';

// double precision and bigint columns come back as JS numbers; counts are well below 2^53.
pg.types.setTypeParser(pg.types.builtins.INT8, (value: string) => Number(value));
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (value: string) => Number(value));

let pool: pg.Pool | undefined;
let instance: Kysely<Database> | undefined;
/** The pool behind each Kysely instance made here, for the writes Kysely cannot do (COPY). */
const pools = new WeakMap<Kysely<Database>, pg.Pool>();

/** The shared pg pool (also handed to better-auth and pg-boss so there is one pool per process). */
export function getPool(): pg.Pool {
  pool ??= new pg.Pool({ connectionString: config().databaseUrl, max: config().databasePoolMax });
  return pool;
}

/** The process-wide Kysely instance. */
export function getDb(): Kysely<Database> {
  if (!instance) {
    instance = new Kysely<Database>({ dialect: new PostgresDialect({ pool: getPool() }) });
    pools.set(instance, getPool());
  }
  return instance;
}

/** Creates a separate Kysely instance for a given URL (scripts and tests). */
export function createDb(connectionString: string): Kysely<Database> {
  const own = new pg.Pool({ connectionString, max: 5 });
  const db = new Kysely<Database>({ dialect: new PostgresDialect({ pool: own }) });
  pools.set(db, own);
  return db;
}

/** The pg pool behind `db` (made by getDb or createDb); the process's pool for any other handle on the same database. */
export function poolOf(db: Kysely<Database>): pg.Pool {
  return pools.get(db) ?? getPool();
}

/**
 * Runs `work` on one connection of `pool`, handing it both a Kysely bound to that connection and the
 * raw pg client (for COPY, which Kysely does not speak). The connection goes back to the pool after,
 * or is discarded if the work failed (it may have died mid-way).
 */
export async function withConnection<T>(
  pool: pg.Pool,
  work: (db: Kysely<Database>, client: pg.PoolClient) => Promise<T>,
): Promise<T> {
  const client = await pool.connect();
  // Kysely "releases" after each query; this handle keeps the client checked out until the work is done.
  const handle = { query: client.query.bind(client), release: () => {} };
  const db = new Kysely<Database>({
    dialect: new PostgresDialect({ pool: { connect: async () => handle, end: async () => {} } }),
  });
  let failure: Error | undefined;
  try {
    return await work(db, client);
  } catch (error) {
    failure = error instanceof Error ? error : new Error(String(error));
    throw error;
  } finally {
    client.release(failure);
  }
}
