import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit } from '../audit/audit.repository';
import { getAuth } from './auth';
import { authCall, invitationNotUsable, membershipNotUsable } from './auth.errors';
import type { SignUpInput } from './auth.schemas';
import { listMemberships, setSessionTrust } from './membership.repository';

/** Cookie header value built from Set-Cookie headers, to act as the new session straight away. */
function cookieHeaderOf(headers: Headers): string {
  return headers
    .getSetCookie()
    .map((line) => line.split(';')[0] ?? '')
    .join('; ');
}

/** A URL-safe slug for a trust name, with a random tail so two trusts never clash. */
function trustSlug(name: string): string {
  const base =
    name
      .toLowerCase()
      .normalize('NFKD')
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-|-$/g, '')
      .slice(0, 48) || 'trust';
  return `${base}-${crypto.randomUUID().slice(0, 6)}`;
}

/** The invitation's state, checked before better-auth is asked, so people get a precise message. */
export async function checkInvitation(db: Kysely<Database>, invitationId: string, email: string | null) {
  const invitation = await db
    .selectFrom('invitation as i')
    .innerJoin('trusts as t', 't.id', 'i.organizationId')
    .select(['i.id', 'i.email', 'i.role', 'i.status', 'i.expiresAt', 't.id as trustId', 't.name as trustName'])
    .where('i.id', '=', invitationId)
    .executeTakeFirst();
  if (!invitation) throw invitationNotUsable('missing');
  if (invitation.status === 'accepted') throw invitationNotUsable('used');
  if (invitation.status === 'canceled' || invitation.status === 'rejected') throw invitationNotUsable('cancelled');
  if (new Date(invitation.expiresAt).getTime() <= Date.now()) throw invitationNotUsable('expired');
  if (email !== null && invitation.email.toLowerCase() !== email.toLowerCase())
    throw invitationNotUsable('other_email');
  return invitation;
}

/**
 * Creates an account and signs it in. With a trust name the person becomes the new trust's admin;
 * with an invitation they join the inviting trust. Returns the session's Set-Cookie headers.
 */
export async function signUp(db: Kysely<Database>, input: SignUpInput, requestHeaders: Headers) {
  if (input.invitationId) await checkInvitation(db, input.invitationId, input.email);
  const auth = getAuth();
  const { headers, response } = await authCall(() =>
    auth.api.signUpEmail({
      body: { name: input.name, email: input.email, password: input.password },
      headers: requestHeaders,
      returnHeaders: true,
    }),
  );
  const user = response.user;
  await recordAudit(db, {
    trustId: null,
    actorUserId: user.id,
    actorEmail: user.email,
    action: 'account.signed_up',
    entityType: 'user',
    entityId: user.id,
    summary: `${user.email} created an account`,
  });
  const sessionHeaders = new Headers({ cookie: cookieHeaderOf(headers) });
  let trust: { id: string; name: string };
  if (input.trustName) {
    const created = await authCall(() =>
      auth.api.createOrganization({
        body: { name: input.trustName!, slug: trustSlug(input.trustName!) },
        headers: sessionHeaders,
      }),
    );
    if (!created) throw new Error('The trust was not created');
    trust = { id: created.id, name: created.name };
    await recordAudit(db, {
      trustId: trust.id,
      actorUserId: user.id,
      actorEmail: user.email,
      action: 'trust.created',
      entityType: 'trust',
      entityId: trust.id,
      summary: `${user.email} created the trust ${trust.name} and became its trust admin`,
      after: { name: trust.name },
    });
  } else {
    trust = await acceptInvitation(db, input.invitationId!, { id: user.id, email: user.email }, sessionHeaders);
  }
  return {
    headers,
    user: { id: user.id, email: user.email, name: user.name, emailVerified: user.emailVerified },
    trust,
  };
}

/** Copies the limits chosen when inviting (schools, end date) onto the new membership. */
async function applyInvitationLimits(db: Kysely<Database>, invitationId: string, memberId: string): Promise<void> {
  const limits = await db
    .selectFrom('invitation_limits')
    .select(['limited_to_schools', sql<string | null>`to_char(access_ends_on, 'YYYY-MM-DD')`.as('access_ends_on')])
    .where('invitation_id', '=', invitationId)
    .executeTakeFirst();
  if (!limits) return;
  await db.transaction().execute(async (trx) => {
    await trx
      .insertInto('membership_limits')
      .values({
        member_id: memberId,
        limited_to_schools: limits.limited_to_schools,
        access_ends_on: limits.access_ends_on,
      })
      .execute();
    await trx
      .insertInto('membership_schools')
      .columns(['member_id', 'school_id'])
      .expression(
        trx
          .selectFrom('invitation_schools')
          .select([sql<string>`${memberId}`.as('member_id'), 'school_id'])
          .where('invitation_id', '=', invitationId),
      )
      .execute();
  });
}

/** Accepts an invitation for the signed-in person and makes its trust their active one. */
export async function acceptInvitation(
  db: Kysely<Database>,
  invitationId: string,
  user: { id: string; email: string },
  requestHeaders: Headers,
) {
  const invitation = await checkInvitation(db, invitationId, user.email);
  const result = await authCall(() =>
    getAuth().api.acceptInvitation({ body: { invitationId }, headers: requestHeaders }),
  );
  if (result?.member) await applyInvitationLimits(db, invitationId, result.member.id);
  await recordAudit(db, {
    trustId: invitation.trustId,
    actorUserId: user.id,
    actorEmail: user.email,
    action: 'member.joined',
    entityType: 'member',
    entityId: result?.member.id ?? null,
    summary: `${user.email} accepted the invitation and joined as ${invitation.role}`,
    after: { role: invitation.role },
  });
  const session = await getAuth().api.getSession({ headers: requestHeaders });
  if (session) await setSessionTrust(db, session.session.id, invitation.trustId);
  return { id: invitation.trustId, name: invitation.trustName };
}

/** Switches the session to another of the person's trusts (not one whose access has ended). */
export async function switchTrust(db: Kysely<Database>, userId: string, trustId: string, requestHeaders: Headers) {
  const membership = (await listMemberships(db, userId)).find((m) => m.trustId === trustId && !m.ended);
  if (!membership) throw membershipNotUsable();
  const session = await getAuth().api.getSession({ headers: requestHeaders });
  if (session) await setSessionTrust(db, session.session.id, trustId);
  return membership;
}
