import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { isRole } from './access';
import type { Role } from './context';

/** One of a person's trust memberships, with its limits. */
export interface Membership {
  memberId: string;
  trustId: string;
  trustName: string;
  role: Role;
  /** Schools the membership is limited to; null = every school of the trust. */
  schoolIds: string[] | null;
  /** ISO date on which access ends (no access from that day), or null. */
  accessEndsOn: string | null;
  /** True once the end date has been reached. */
  ended: boolean;
}

/** Every trust the user belongs to, oldest membership first. */
export async function listMemberships(db: Kysely<Database>, userId: string): Promise<Membership[]> {
  const rows = await db
    .selectFrom('member as m')
    .innerJoin('trusts as t', 't.id', 'm.organizationId')
    .leftJoin('membership_limits as l', 'l.member_id', 'm.id')
    .select([
      'm.id as memberId',
      't.id as trustId',
      't.name as trustName',
      'm.role',
      sql<boolean>`coalesce(l.limited_to_schools, false)`.as('limited'),
      sql<
        string[]
      >`coalesce((SELECT array_agg(s.school_id::text ORDER BY s.school_id) FROM membership_schools s WHERE s.member_id = m.id), '{}')`.as(
        'schoolIds',
      ),
      sql<string | null>`to_char(l.access_ends_on, 'YYYY-MM-DD')`.as('accessEndsOn'),
      sql<boolean>`coalesce(l.access_ends_on <= current_date, false)`.as('ended'),
    ])
    .where('m.userId', '=', userId)
    .orderBy('m.createdAt')
    .execute();
  return rows.flatMap((row) =>
    isRole(row.role)
      ? [
          {
            memberId: row.memberId,
            trustId: row.trustId,
            trustName: row.trustName,
            role: row.role,
            schoolIds: row.limited ? row.schoolIds : null,
            accessEndsOn: row.accessEndsOn,
            ended: row.ended,
          },
        ]
      : [],
  );
}

/** Records which trust a session acts in. */
export async function setSessionTrust(db: Kysely<Database>, sessionId: string, trustId: string | null): Promise<void> {
  await db.updateTable('session').set({ activeOrganizationId: trustId }).where('id', '=', sessionId).execute();
}
