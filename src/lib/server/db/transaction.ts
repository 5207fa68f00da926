import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';

/**
 * Runs `work` in the caller's transaction when `db` is one, else in a transaction of its own, so a service can be
 * called on its own (a route) or as one step of a larger write (an import) and is all-or-nothing either way.
 */
export function inTransaction<T>(db: Kysely<Database>, work: (trx: Kysely<Database>) => Promise<T>): Promise<T> {
  return db.isTransaction ? work(db) : db.transaction().execute(work);
}
