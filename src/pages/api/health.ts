import { sql } from 'kysely';
import { getDb } from '../../lib/server/db/client';
import { json } from '../../lib/server/http/respond';
import { route } from '../../lib/server/http/route';

/** Liveness and database reachability, for people and load balancers. */
export const GET = route(async () => {
  try {
    await sql`SELECT 1`.execute(getDb());
    return json({ status: 'ok', database: 'reachable' });
  } catch {
    return json({ status: 'degraded', database: 'unreachable' }, 503);
  }
});
