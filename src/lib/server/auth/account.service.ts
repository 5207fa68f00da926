import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { createEmailVerificationToken } from 'better-auth/api';
import { recordAudit } from '../audit/audit.repository';
import { runInBackground } from '../background';
import { authSecret, config } from '../config';
import { sendMail } from '../mail/mailer';
import { existingAccountMail, joinedByInvitationMail, verificationMail } from '../mail/templates';
import { getAuth, VERIFICATION_SECONDS } from './auth';
import { authCall, invitationNotUsable, membershipNotUsable } from './auth.errors';
import type { ChangePasswordInput, SignUpInput } from './auth.schemas';
import type { Role } from './context';
import { listMemberships, setSessionTrust } from './membership.repository';

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
 * Starts creating an account for a sign-up: checks the invitation (if any), then finishes in the
 * background, so the answer is the same, and as quick, whether or not the address already has an
 * account. The owner of the address learns which by e-mail: a confirmation link that signs the new
 * account in, or a note that they already have one.
 */
export async function requestSignUp(db: Kysely<Database>, input: SignUpInput): Promise<void> {
  if (input.invitationId) await checkInvitation(db, input.invitationId, input.email);
  runInBackground('sign-up', () => completeSignUp(db, input));
}

/** Sends the link that confirms the address and signs the account in (our /verify-email page). */
export async function sendVerificationLink(user: { id: string; email: string; name: string }): Promise<void> {
  const token = await createEmailVerificationToken(authSecret(), user.email, undefined, VERIFICATION_SECONDS, {
    userId: user.id,
  });
  await sendMail(verificationMail(user, `${config().origin}/verify-email?token=${encodeURIComponent(token)}`));
}

/** Tells the owner of an address that already has an account that someone tried to sign up with it. */
async function sendExistingAccountNote(user: { email: string; name: string }, invitationId: string | undefined) {
  const origin = config().origin;
  await sendMail(
    existingAccountMail(user, {
      signIn: `${origin}/sign-in`,
      resetPassword: `${origin}/forgot-password`,
      invitation: invitationId ? `${origin}/accept-invitation?id=${encodeURIComponent(invitationId)}` : null,
    }),
  );
}

/**
 * Creates the account (unverified, not signed in) with the trust it names or the membership it was
 * invited to, audits both, then e-mails the confirmation link. An address that already has an account
 * gets a note instead and nothing changes.
 */
export async function completeSignUp(db: Kysely<Database>, input: SignUpInput): Promise<void> {
  const existing = await db
    .selectFrom('user')
    .select(['email', 'name'])
    .where('email', '=', input.email)
    .executeTakeFirst();
  if (existing) return sendExistingAccountNote(existing, input.invitationId);
  const auth = getAuth();
  const { user } = await authCall(() =>
    auth.api.signUpEmail({ body: { name: input.name, email: input.email, password: input.password } }),
  );
  // Two sign-ups of one new address at once: the second gets better-auth's stand-in user, not a row.
  const created = await db.selectFrom('user').select(['id', 'name']).where('id', '=', user.id).executeTakeFirst();
  if (!created) return sendExistingAccountNote({ email: input.email, name: input.name }, input.invitationId);
  await recordAudit(db, {
    trustId: null,
    actorUserId: user.id,
    actorEmail: user.email,
    action: 'account.signed_up',
    entityType: 'user',
    entityId: user.id,
    summary: `${user.email} created an account`,
  });
  if (input.trustName) {
    const trustName = input.trustName;
    const trust = await authCall(() =>
      auth.api.createOrganization({ body: { name: trustName, slug: trustSlug(trustName), userId: user.id } }),
    );
    if (!trust) throw new Error('The trust was not created');
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
  } else if (input.invitationId) {
    // The invitation was e-mailed to this address and its link opened: that proves the address, so no
    // confirmation link is sent; the person signs in with the password just chosen.
    const trust = await joinByInvitation(db, input.invitationId, { id: user.id, email: user.email });
    await sendMail(
      joinedByInvitationMail({ email: user.email, name: user.name }, trust.trustName, `${config().origin}/sign-in`),
    );
    return;
  }
  await sendVerificationLink({ id: user.id, email: user.email, name: user.name });
}

/**
 * Marks the address verified when a person accepts an invitation sent to that same address (the e-mailed link
 * proves it); never for another address. Audited with the acceptance.
 */
async function verifyByInvitation(
  db: Kysely<Database>,
  invitation: { trustId: string; email: string },
  user: { id: string; email: string },
): Promise<void> {
  if (invitation.email.toLowerCase() !== user.email.toLowerCase()) return;
  await db.transaction().execute(async (trx) => {
    const changed = await trx
      .updateTable('user')
      .set({ emailVerified: true })
      .where('id', '=', user.id)
      .where('email', '=', user.email)
      .where('emailVerified', '=', false)
      .executeTakeFirst();
    if (Number(changed.numUpdatedRows) === 0) return;
    await recordAudit(trx, {
      trustId: invitation.trustId,
      actorUserId: user.id,
      actorEmail: user.email,
      action: 'account.verified_by_invitation',
      entityType: 'user',
      entityId: user.id,
      summary: `${user.email} confirmed by opening the invitation e-mailed to that address`,
    });
  });
}

/** Makes a new account a member as its invitation says (the person is not signed in yet). */
async function joinByInvitation(db: Kysely<Database>, invitationId: string, user: { id: string; email: string }) {
  const invitation = await checkInvitation(db, invitationId, user.email);
  const member = await authCall(() =>
    getAuth().api.addMember({
      body: { userId: user.id, role: invitation.role as Role, organizationId: invitation.trustId },
    }),
  );
  await db.updateTable('invitation').set({ status: 'accepted' }).where('id', '=', invitationId).execute();
  if (member) await applyInvitationLimits(db, invitationId, member.id);
  await auditJoined(db, invitation, user, member?.id ?? null);
  await verifyByInvitation(db, invitation, user);
  return invitation;
}

/** Audits a person joining a trust by its invitation. */
function auditJoined(
  db: Kysely<Database>,
  invitation: { trustId: string; role: string | null },
  user: { id: string; email: string },
  memberId: string | null,
) {
  return recordAudit(db, {
    trustId: invitation.trustId,
    actorUserId: user.id,
    actorEmail: user.email,
    action: 'member.joined',
    entityType: 'member',
    entityId: memberId,
    summary: `${user.email} accepted the invitation and joined as ${invitation.role}`,
    after: { role: invitation.role },
  });
}

/**
 * Asks better-auth to e-mail a password link, in the background: the answer takes the same time
 * whether or not the address has an account (better-auth itself answers alike for both).
 */
export function requestPasswordReset(email: string): void {
  runInBackground('password reset', () =>
    getAuth().api.requestPasswordReset({ body: { email, redirectTo: '/reset-password' } }),
  );
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
  await auditJoined(db, invitation, user, result?.member.id ?? null);
  await verifyByInvitation(db, invitation, user);
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

/**
 * Sends the signed-in person a new link to confirm their e-mail address (the link is a signed token: nothing is stored
 * but the audit entry, written once the mail has been handed over).
 */
export async function resendVerification(
  db: Kysely<Database>,
  user: { id: string; email: string },
  requestHeaders: Headers,
): Promise<void> {
  await authCall(() => getAuth().api.sendVerificationEmail({ body: { email: user.email }, headers: requestHeaders }));
  await recordAudit(db, {
    trustId: null,
    actorUserId: user.id,
    actorEmail: user.email,
    action: 'account.verification_sent',
    entityType: 'user',
    entityId: user.id,
    summary: `${user.email} asked for a new confirmation link`,
  });
}

/**
 * Changes the signed-in person's password and signs out their other devices (audited by auth.ts); answers the
 * response headers that carry this device's new session cookie.
 */
export async function changePassword(requestHeaders: Headers, input: ChangePasswordInput): Promise<Headers> {
  const result = await authCall(() =>
    getAuth().api.changePassword({
      body: { ...input, revokeOtherSessions: true },
      headers: requestHeaders,
      returnHeaders: true,
    }),
  );
  return result.headers;
}

/** Signs the person out on every device, this one included (audited by auth.ts); answers headers clearing its cookie. */
export async function signOutEverywhere(requestHeaders: Headers): Promise<Headers> {
  await authCall(() => getAuth().api.revokeSessions({ headers: requestHeaders }));
  const prefix = config().auth.secureCookies ? '__Secure-' : '';
  const secure = config().auth.secureCookies ? '; Secure' : '';
  return new Headers({
    'set-cookie': `${prefix}better-auth.session_token=; Max-Age=0; Path=/; HttpOnly; SameSite=Lax${secure}`,
  });
}
