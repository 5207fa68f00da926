import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit } from '../audit/audit.repository';
import { badRequest, notFound } from '../http/errors';
import { getAuth } from './auth';
import { authCall, lastTrustAdmin, limitedToSchools } from './auth.errors';
import type { InviteInput, MemberUpdate } from './auth.schemas';
import { config } from '../config';
import { formatDate } from '../../format';
import { sendMail } from '../mail/mailer';
import { invitationMail } from '../mail/templates';
import { ROLE_LABELS, ROLE_MEANS, type ActiveTrust, type Role, type SessionUser } from './context';

/** A member of the trust as the members page and API show it. */
export interface MemberView {
  id: string;
  userId: string;
  name: string;
  email: string;
  role: Role;
  joinedAt: string;
  schoolIds: string[] | null;
  accessEndsOn: string | null;
  ended: boolean;
}

/** An invitation that has not been accepted yet. */
export interface InvitationView {
  id: string;
  email: string;
  role: Role;
  expiresAt: string;
  /** Schools the membership will be limited to; null = all. */
  schoolIds: string[] | null;
  /** ISO date on which the membership's access will end, or null. */
  accessEndsOn: string | null;
}

/** Who acts, and in which trust. */
interface Actor {
  user: SessionUser;
  trust: ActiveTrust;
  headers: Headers;
}

/** The trust's members (with their limits) and pending invitations. */
export async function listMembers(
  db: Kysely<Database>,
  trust: ActiveTrust,
): Promise<{ members: MemberView[]; invitations: InvitationView[] }> {
  const members = await db
    .selectFrom('member as m')
    .innerJoin('user as u', 'u.id', 'm.userId')
    .leftJoin('membership_limits as l', 'l.member_id', 'm.id')
    .select([
      'm.id',
      'm.userId',
      'u.name',
      'u.email',
      'm.role',
      'm.createdAt',
      sql<boolean>`coalesce(l.limited_to_schools, false)`.as('limited'),
      sql<
        string[]
      >`coalesce((SELECT array_agg(s.school_id::text ORDER BY s.school_id) FROM membership_schools s WHERE s.member_id = m.id), '{}')`.as(
        'schoolIds',
      ),
      sql<string | null>`to_char(l.access_ends_on, 'YYYY-MM-DD')`.as('accessEndsOn'),
      sql<boolean>`coalesce(l.access_ends_on <= current_date, false)`.as('ended'),
    ])
    .where('m.organizationId', '=', trust.id)
    .orderBy('u.name')
    .execute();
  const invitations = await db
    .selectFrom('invitation as i')
    .leftJoin('invitation_limits as l', 'l.invitation_id', 'i.id')
    .select([
      'i.id',
      'i.email',
      'i.role',
      'i.expiresAt',
      sql<boolean>`coalesce(l.limited_to_schools, false)`.as('limited'),
      sql<
        string[]
      >`coalesce((SELECT array_agg(s.school_id::text ORDER BY s.school_id) FROM invitation_schools s WHERE s.invitation_id = i.id), '{}')`.as(
        'schoolIds',
      ),
      sql<string | null>`to_char(l.access_ends_on, 'YYYY-MM-DD')`.as('accessEndsOn'),
    ])
    .where('i.organizationId', '=', trust.id)
    .where('i.status', '=', 'pending')
    .where('i.expiresAt', '>', new Date())
    .orderBy('i.createdAt', 'desc')
    .execute();
  return {
    members: members.map((m) => ({
      id: m.id,
      userId: m.userId,
      name: m.name,
      email: m.email,
      role: m.role as Role,
      joinedAt: new Date(m.createdAt).toISOString(),
      schoolIds: m.limited ? m.schoolIds : null,
      accessEndsOn: m.accessEndsOn,
      ended: m.ended,
    })),
    invitations: invitations.map((i) => ({
      id: i.id,
      email: i.email,
      role: i.role as Role,
      expiresAt: new Date(i.expiresAt).toISOString(),
      schoolIds: i.limited ? i.schoolIds : null,
      accessEndsOn: i.accessEndsOn,
    })),
  };
}

/**
 * The member list as a member limited to some schools may see it: other members' and invitations' school
 * limits show only the schools the viewer may see (the ids of the others would name them).
 */
export function membersAsSeenBy(
  list: { members: MemberView[]; invitations: InvitationView[] },
  viewer: ActiveTrust,
): { members: MemberView[]; invitations: InvitationView[] } {
  const visible = viewer.schoolIds;
  if (visible === null) return list;
  const only = (ids: string[] | null) => (ids === null ? null : ids.filter((id) => visible.includes(id)));
  return {
    members: list.members.map((m) => ({ ...m, schoolIds: only(m.schoolIds) })),
    invitations: list.invitations.map((i) => ({ ...i, schoolIds: only(i.schoolIds) })),
  };
}

async function findMember(db: Kysely<Database>, trust: ActiveTrust, memberId: string): Promise<MemberView> {
  const member = (await listMembers(db, trust)).members.find((m) => m.id === memberId);
  if (!member) throw notFound('That member');
  return member;
}

/** Refuses a change that would leave the trust without a trust admin who still has access. */
async function assertAnotherAdminRemains(db: Kysely<Database>, trust: ActiveTrust, memberId: string): Promise<void> {
  const admins = (await listMembers(db, trust)).members.filter(
    (m) => m.role === 'trust_admin' && !m.ended && m.accessEndsOn === null,
  );
  if (!admins.some((m) => m.id !== memberId)) throw lastTrustAdmin();
}

/**
 * A member limited to some schools manages only people limited to some of those same schools: never
 * grants access beyond their own (no limit at all, or another school), never changes or removes someone
 * who can see more than they can.
 */
function assertWithinOwnSchools(trust: ActiveTrust, schoolIds: readonly string[] | null, action: string): void {
  const own = trust.schoolIds;
  if (own === null) return;
  if (schoolIds === null || schoolIds.length === 0 || schoolIds.some((id) => !own.includes(id)))
    throw limitedToSchools(action);
}

/** 400 unless every school id belongs to the trust. */
async function assertSchoolsInTrust(db: Kysely<Database>, trust: ActiveTrust, schoolIds: string[]): Promise<void> {
  if (schoolIds.length === 0) return;
  const known = await db
    .selectFrom('schools')
    .select('id')
    .where('trust_id', '=', trust.id)
    .where('id', 'in', schoolIds)
    .execute();
  if (known.length !== new Set(schoolIds).size)
    throw badRequest('Every school must belong to this trust.', { field: 'schoolIds' });
}

/**
 * Invites someone by e-mail with a role, optionally limited to schools and an end date (applied when
 * they accept); the plugin sends the e-mail through our mailer.
 */
export async function inviteMember(db: Kysely<Database>, actor: Actor, input: InviteInput): Promise<InvitationView> {
  const schoolIds = input.schoolIds ?? null;
  const accessEndsOn = input.accessEndsOn ?? null;
  assertWithinOwnSchools(actor.trust, schoolIds, 'invite someone with access to schools beyond yours');
  if (schoolIds) await assertSchoolsInTrust(db, actor.trust, schoolIds);
  const invitation = await authCall(() =>
    getAuth().api.createInvitation({
      body: { email: input.email, role: input.role, organizationId: actor.trust.id, resend: true },
      headers: actor.headers,
    }),
  );
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('invitation_schools').where('invitation_id', '=', invitation.id).execute();
    await trx.deleteFrom('invitation_limits').where('invitation_id', '=', invitation.id).execute();
    if (schoolIds || accessEndsOn) {
      await trx
        .insertInto('invitation_limits')
        .values({ invitation_id: invitation.id, limited_to_schools: schoolIds !== null, access_ends_on: accessEndsOn })
        .execute();
      if (schoolIds?.length) {
        await trx
          .insertInto('invitation_schools')
          .values([...new Set(schoolIds)].map((school_id) => ({ invitation_id: invitation.id, school_id })))
          .execute();
      }
    }
    await recordAudit(trx, {
      trustId: actor.trust.id,
      actorUserId: actor.user.id,
      actorEmail: actor.user.email,
      action: 'member.invited',
      entityType: 'invitation',
      entityId: invitation.id,
      summary: `${actor.user.email} invited ${input.email} as ${input.role}`,
      after: { email: input.email, role: input.role, schoolIds, accessEndsOn },
    });
  });
  await sendInvitation(
    db,
    actor,
    { id: invitation.id, email: invitation.email, expiresAt: invitation.expiresAt },
    input.role,
    {
      schoolIds,
      accessEndsOn,
    },
  );
  return {
    id: invitation.id,
    email: invitation.email,
    role: input.role,
    expiresAt: new Date(invitation.expiresAt).toISOString(),
    schoolIds,
    accessEndsOn,
  };
}

/** E-mails the invitation once its limits are stored: the role in words, the schools by name, the end date, the inviter. */
async function sendInvitation(
  db: Kysely<Database>,
  actor: Actor,
  invitation: { id: string; email: string; expiresAt: Date | string },
  role: Role,
  limits: { schoolIds: string[] | null; accessEndsOn: string | null },
): Promise<void> {
  const schoolNames = limits.schoolIds
    ? limits.schoolIds.length === 0
      ? []
      : (
          await db
            .selectFrom('schools')
            .select('name')
            .where('trust_id', '=', actor.trust.id)
            .where('id', 'in', limits.schoolIds)
            .orderBy('name')
            .execute()
        ).map((s) => s.name)
    : null;
  await sendMail(
    invitationMail(invitation.email, {
      trustName: actor.trust.name,
      inviterName: actor.user.name || actor.user.email,
      inviterEmail: actor.user.email,
      roleLabel: ROLE_LABELS[role],
      roleMeans: ROLE_MEANS[role],
      schoolNames,
      accessEndsOn: limits.accessEndsOn ? formatDate(limits.accessEndsOn) : null,
      expiresOn: formatDate(new Date(invitation.expiresAt)),
      url: `${config().origin}/accept-invitation?id=${encodeURIComponent(invitation.id)}`,
    }),
  );
}

/** Withdraws a pending invitation of the active trust. */
export async function cancelInvitation(db: Kysely<Database>, actor: Actor, invitationId: string): Promise<void> {
  const invitation = await db
    .selectFrom('invitation')
    .select(['id', 'email', 'status'])
    .where('id', '=', invitationId)
    .where('organizationId', '=', actor.trust.id)
    .executeTakeFirst();
  if (invitation?.status !== 'pending') throw notFound('That pending invitation');
  if (actor.trust.schoolIds !== null) {
    const limits = (await listMembers(db, actor.trust)).invitations.find((i) => i.id === invitationId);
    assertWithinOwnSchools(actor.trust, limits?.schoolIds ?? null, 'withdraw an invitation to schools beyond yours');
  }
  await authCall(() => getAuth().api.cancelInvitation({ body: { invitationId }, headers: actor.headers }));
  await recordAudit(db, {
    trustId: actor.trust.id,
    actorUserId: actor.user.id,
    actorEmail: actor.user.email,
    action: 'member.invitation_cancelled',
    entityType: 'invitation',
    entityId: invitationId,
    summary: `${actor.user.email} withdrew the invitation to ${invitation.email}`,
  });
}

/** Changes a member's role, school limits and end date; the last trust admin keeps the role and access. */
export async function updateMember(
  db: Kysely<Database>,
  actor: Actor,
  memberId: string,
  change: MemberUpdate,
): Promise<MemberView> {
  const before = await findMember(db, actor.trust, memberId);
  assertWithinOwnSchools(actor.trust, before.schoolIds, 'change a member who has access to schools beyond yours');
  if (change.schoolIds !== undefined)
    assertWithinOwnSchools(actor.trust, change.schoolIds, 'give access to schools beyond yours');
  const demotes = change.role !== undefined && change.role !== 'trust_admin' && before.role === 'trust_admin';
  const ends = change.accessEndsOn != null && before.role === 'trust_admin';
  if (demotes || ends) await assertAnotherAdminRemains(db, actor.trust, memberId);
  if (change.schoolIds) await assertSchoolsInTrust(db, actor.trust, change.schoolIds);
  if (change.role !== undefined && change.role !== before.role) {
    await authCall(() =>
      getAuth().api.updateMemberRole({
        body: { memberId, role: change.role!, organizationId: actor.trust.id },
        headers: actor.headers,
      }),
    );
  }
  await db.transaction().execute(async (trx) => {
    if (change.schoolIds !== undefined || change.accessEndsOn !== undefined) {
      const limited = change.schoolIds !== undefined ? change.schoolIds !== null : before.schoolIds !== null;
      const endsOn = change.accessEndsOn !== undefined ? change.accessEndsOn : before.accessEndsOn;
      await trx
        .insertInto('membership_limits')
        .values({ member_id: memberId, limited_to_schools: limited, access_ends_on: endsOn })
        .onConflict((oc) => oc.column('member_id').doUpdateSet({ limited_to_schools: limited, access_ends_on: endsOn }))
        .execute();
      if (change.schoolIds !== undefined) {
        await trx.deleteFrom('membership_schools').where('member_id', '=', memberId).execute();
        if (change.schoolIds?.length) {
          await trx
            .insertInto('membership_schools')
            .values([...new Set(change.schoolIds)].map((school_id) => ({ member_id: memberId, school_id })))
            .execute();
        }
      }
    }
  });
  const after = await findMember(db, actor.trust, memberId);
  const what = [
    after.role !== before.role ? `role ${before.role} → ${after.role}` : null,
    JSON.stringify(after.schoolIds) !== JSON.stringify(before.schoolIds)
      ? after.schoolIds
        ? `limited to ${after.schoolIds.length} school(s)`
        : 'all schools'
      : null,
    after.accessEndsOn !== before.accessEndsOn
      ? after.accessEndsOn
        ? `access ends on ${after.accessEndsOn}`
        : 'no end date'
      : null,
  ].filter(Boolean);
  if (what.length) {
    await recordAudit(db, {
      trustId: actor.trust.id,
      actorUserId: actor.user.id,
      actorEmail: actor.user.email,
      action: after.role !== before.role ? 'member.role_changed' : 'member.limits_changed',
      entityType: 'member',
      entityId: memberId,
      summary: `${actor.user.email} changed ${before.email}: ${what.join('; ')}`,
      before: { role: before.role, schoolIds: before.schoolIds, accessEndsOn: before.accessEndsOn },
      after: { role: after.role, schoolIds: after.schoolIds, accessEndsOn: after.accessEndsOn },
    });
  }
  return after;
}

/** Removes a member from the trust; never the last trust admin. */
export async function removeMember(db: Kysely<Database>, actor: Actor, memberId: string): Promise<void> {
  const member = await findMember(db, actor.trust, memberId);
  assertWithinOwnSchools(actor.trust, member.schoolIds, 'remove a member who has access to schools beyond yours');
  if (member.role === 'trust_admin') await assertAnotherAdminRemains(db, actor.trust, memberId);
  await authCall(() =>
    getAuth().api.removeMember({
      body: { memberIdOrEmail: memberId, organizationId: actor.trust.id },
      headers: actor.headers,
    }),
  );
  await recordAudit(db, {
    trustId: actor.trust.id,
    actorUserId: actor.user.id,
    actorEmail: actor.user.email,
    action: 'member.removed',
    entityType: 'member',
    entityId: memberId,
    summary: `${actor.user.email} removed ${member.email} (${member.role}) from the trust`,
    before: { email: member.email, role: member.role },
  });
}
