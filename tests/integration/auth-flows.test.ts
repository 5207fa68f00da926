import { afterAll, describe, expect, it } from 'vitest';
import { createDb } from '../../src/lib/server/db/client';
import { removeDemoMembersAddedSince } from '../helpers/db';
import { linkIn, listMail, waitForMail } from '../helpers/mail';
import { waitFor } from '../helpers/wait';
import { verifiedTrust } from './billing-fixture';
import {
  DEMO_ACCOUNTS,
  DEMO_PASSWORD,
  api,
  cookieFrom,
  createOtherTrust,
  flashOf,
  postForm,
  signIn,
  signUp,
  uniqueEmail,
} from '../helpers/session';

const db = createDb(process.env.DATABASE_URL ?? '');
/** When this file started: what it added to the shared demo trust after that is taken out again at the end. */
const fileStartedAt = new Date();
afterAll(async () => {
  await removeDemoMembersAddedSince(db, fileStartedAt);
  await db.destroy();
});

const json = async <T>(response: Response) => (await response.json()) as T;
interface AccountBody {
  user: { email: string; emailVerified: boolean };
  trust: { id: string; role: string; schoolIds: string[] | null } | null;
}

describe('sign-up', () => {
  it('creates the account and the trust it names, with the person as its trust admin, and audits both', async () => {
    const { cookie, trustId, email } = await createOtherTrust();
    const account = await json<AccountBody>(await api('/api/account', { cookie }));
    expect(account.user.email).toBe(email);
    expect(account.user.emailVerified).toBe(false);
    expect(account.trust).toMatchObject({ id: trustId, role: 'trust_admin', schoolIds: null });
    const trustRow = await db.selectFrom('trusts').select(['id', 'name']).where('id', '=', trustId).executeTakeFirst();
    expect(trustRow?.name).toMatch(/^Other Test Trust/);
    const actions = await db.selectFrom('audit_events').select('action').where('actor_email', '=', email).execute();
    expect(actions.map((a) => a.action).sort()).toEqual(['account.signed_up', 'trust.created']);
  });

  it('answers a sign-up with a taken address as for a new one, e-mails its owner, and changes nothing', async () => {
    const trustName = `Duplicate Trust ${uniqueEmail('x').slice(2, 10)}`;
    const before = await db
      .selectFrom('account')
      .select('password')
      .where('userId', '=', 'demo-user-viewer')
      .executeTakeFirstOrThrow();
    const fresh = uniqueEmail('fresh');
    const answers = await Promise.all(
      [DEMO_ACCOUNTS.viewer, fresh].map((email) =>
        api('/api/account/sign-up', {
          method: 'POST',
          body: JSON.stringify({ name: 'Dup', email, password: 'some-other-password-1', trustName }),
        }),
      ),
    );
    const [taken, unused] = await Promise.all(
      answers.map(async (r) => ({ status: r.status, body: await r.json(), cookie: cookieFrom(r) })),
    );
    expect(taken!.status).toBe(202);
    expect(unused!.status).toBe(202);
    // The same answer apart from the address itself, and no session either way.
    expect({ ...taken!.body, email: null }).toEqual({ ...unused!.body, email: null });
    expect(taken!.cookie).toBe('');
    const note = await waitForMail(DEMO_ACCOUNTS.viewer, 'already have an Airtally account');
    expect(note.text).toContain('Nothing was changed');
    linkIn(note, '/forgot-password');
    await waitForMail(fresh, 'Confirm your e-mail');
    const after = await db
      .selectFrom('account')
      .select('password')
      .where('userId', '=', 'demo-user-viewer')
      .executeTakeFirstOrThrow();
    expect(after.password).toBe(before.password);
    const trusts = await db.selectFrom('trusts').select('id').where('name', '=', trustName).execute();
    expect(trusts).toHaveLength(1); // only the new address's trust
    await expect(signIn(DEMO_ACCOUNTS.viewer, 'some-other-password-1')).rejects.toThrow(/401/);
  });

  it('signs the new account in from the e-mailed confirmation link', async () => {
    const email = uniqueEmail('confirm');
    const response = await api('/api/account/sign-up', {
      method: 'POST',
      body: JSON.stringify({ name: 'Confirming', email, password: DEMO_PASSWORD, trustName: 'Confirming Trust' }),
    });
    expect(response.status).toBe(202);
    const link = linkIn(await waitForMail(email, 'Confirm your e-mail'), '/verify-email');
    const page = await api(`${link.pathname}${link.search}`);
    expect(page.status).toBe(200);
    const cookie = cookieFrom(page);
    expect(cookie).toContain('session_token');
    const account = await json<AccountBody>(await api('/api/account', { cookie }));
    expect(account.user).toMatchObject({ email, emailVerified: true });
    expect(account.trust).toMatchObject({ role: 'trust_admin' });
  });

  it('keeps an unverified user from inviting until the e-mailed link confirms the address', async () => {
    const { cookie, email } = await createOtherTrust();
    const before = await api('/api/members', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ email: uniqueEmail('colleague'), role: 'viewer' }),
    });
    expect(before.status).toBe(403);
    expect((await json<{ error: { code: string } }>(before)).error.code).toBe('email_unverified');

    const mail = await waitForMail(email, 'Confirm your e-mail');
    const link = linkIn(mail, '/verify-email');
    const page = await api(`${link.pathname}${link.search}`, { cookie });
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('your e-mail address is confirmed');

    const after = await api('/api/members', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ email: uniqueEmail('colleague'), role: 'viewer' }),
    });
    expect(after.status).toBe(201);
    const verified = await db.selectFrom('user').select('emailVerified').where('email', '=', email).executeTakeFirst();
    expect(verified?.emailVerified).toBe(true);
    const tampered = await api(`${link.pathname}?token=${link.searchParams.get('token')}x`, { cookie });
    expect(tampered.status).toBe(400);
    expect(await tampered.text()).toContain('expired or has already been used');
  });
});

describe('invitations', () => {
  it('invites by e-mail, the link accepts, and the invited role applies', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const email = uniqueEmail('invitee');
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'estates_manager' }),
    });
    expect(invite.status).toBe(201);

    const mail = await waitForMail(email, 'invited you');
    expect(mail.subject).toContain('Brackenmoor Valley Learning Trust');
    expect(mail.html).toContain('Accept the invitation');
    const link = linkIn(mail, '/accept-invitation');
    const invitationId = link.searchParams.get('id') ?? '';
    const page = await api(`${link.pathname}${link.search}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('as <strong>estates manager</strong>');

    const cookie = await signUp({ name: 'New Estates Colleague', email, invitationId });
    const account = await json<AccountBody>(await api('/api/account', { cookie }));
    expect(account.trust).toMatchObject({ id: 'demo-trust', role: 'estates_manager' });
    // An estates manager reads the estate but may not invite.
    expect((await api('/api/schools', { cookie })).status).toBe(200);
    expect(
      (
        await api('/api/members', {
          method: 'POST',
          cookie,
          body: JSON.stringify({ email: uniqueEmail('x'), role: 'viewer' }),
        })
      ).status,
    ).toBe(403);

    const again = await api('/api/account/accept-invitation', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ invitationId }),
    });
    expect(again.status).toBe(409);
    expect((await json<{ error: { code: string; message: string } }>(again)).error.code).toBe('invitation_used');
    const usedPage = await api(`${link.pathname}${link.search}`);
    expect(await usedPage.text()).toContain('already been used');

    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'actor_email'])
      .where('trust_id', '=', 'demo-trust')
      .where('summary', 'like', `%${email}%`)
      .execute();
    // Signing up from the invitation's own link also confirmed the address (no confirmation link was needed).
    expect(audit.map((a) => a.action).sort()).toEqual([
      'account.verified_by_invitation',
      'member.invited',
      'member.joined',
    ]);
  });

  it('carries school limits and an end date chosen when inviting onto the membership', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const email = uniqueEmail('head-teacher');
    const school = await db
      .selectFrom('schools')
      .select('id')
      .where('trust_id', '=', 'demo-trust')
      .orderBy('name', 'desc')
      .executeTakeFirstOrThrow();
    const tomorrow = new Date(Date.now() + 86_400_000).toISOString().slice(0, 10);
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'viewer', schoolIds: [school.id], accessEndsOn: tomorrow }),
    });
    expect(invite.status).toBe(201);
    const { invitation } = await json<{ invitation: { id: string } }>(invite);
    const cookie = await signUp({ name: 'Head Teacher', email, invitationId: invitation.id });
    expect((await json<AccountBody>(await api('/api/account', { cookie }))).trust).toMatchObject({
      role: 'viewer',
      schoolIds: [school.id],
    });
    const { members } = await json<{ members: { email: string; accessEndsOn: string | null }[] }>(
      await api('/api/members', { cookie: admin }),
    );
    expect(members.find((m) => m.email === email)?.accessEndsOn).toBe(tomorrow);
  });

  it('refuses invitation limits naming another trust’s school or a past end date', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const past = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email: uniqueEmail('x'), role: 'viewer', accessEndsOn: '2020-01-31' }),
    });
    expect(past.status).toBe(400);
    expect((await json<{ error: { message: string } }>(past)).error.message).toContain('after today');
    const foreign = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({
        email: uniqueEmail('x'),
        role: 'viewer',
        schoolIds: ['00000000-0000-4000-8000-000000000000'],
      }),
    });
    expect(foreign.status).toBe(400);
  });

  it('refuses an invitation with a role that does not exist', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const response = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email: uniqueEmail('x'), role: 'owner' }),
    });
    expect(response.status).toBe(400);
    expect((await json<{ error: { message: string } }>(response)).error.message).toContain('trust_admin');
  });

  it('refuses an expired invitation with a clear message', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const email = uniqueEmail('late');
    const invite = await json<{ invitation: { id: string } }>(
      await api('/api/members', { method: 'POST', cookie: admin, body: JSON.stringify({ email, role: 'viewer' }) }),
    );
    await db
      .updateTable('invitation')
      .set({ expiresAt: new Date(Date.now() - 60_000) })
      .where('id', '=', invite.invitation.id)
      .execute();
    const response = await api('/api/account/sign-up', {
      method: 'POST',
      body: JSON.stringify({ name: 'Late', email, password: DEMO_PASSWORD, invitationId: invite.invitation.id }),
    });
    expect(response.status).toBe(409);
    expect((await json<{ error: { code: string } }>(response)).error.code).toBe('invitation_expired');
  });
});

describe('members', () => {
  it('never removes or demotes the last trust admin', async () => {
    const { cookie } = await createOtherTrust();
    const { members } = await json<{ members: { id: string; role: string }[] }>(await api('/api/members', { cookie }));
    expect(members).toHaveLength(1);
    const self = members[0]!;
    const demote = await api(`/api/members/${self.id}`, {
      method: 'PATCH',
      cookie,
      body: JSON.stringify({ role: 'viewer' }),
    });
    expect(demote.status).toBe(409);
    expect((await json<{ error: { code: string } }>(demote)).error.code).toBe('last_trust_admin');
    const remove = await api(`/api/members/${self.id}`, { method: 'DELETE', cookie });
    expect(remove.status).toBe(409);
    const row = await db.selectFrom('member').select('role').where('id', '=', self.id).executeTakeFirst();
    expect(row?.role).toBe('trust_admin');
  });

  it('serves the members page forms without JavaScript: invite, withdraw, change and remove through /api/members', async () => {
    const { cookie: admin, trustId } = await verifiedTrust();
    const back = '/app/settings/members';
    const invitationsTo = (email: string) =>
      db
        .selectFrom('invitation')
        .select(['id', 'status', 'role'])
        .where('organizationId', '=', trustId)
        .where('email', '=', email)
        .execute();

    const withdrawnEmail = uniqueEmail('withdrawn');
    const invited = await postForm('/api/members', { email: withdrawnEmail, role: 'viewer', back }, admin);
    expect(invited.status).toBe(303);
    expect(invited.headers.get('location')).toBe(back);
    expect(flashOf(invited)).toEqual({ kind: 'ok', message: `Invitation sent to ${withdrawnEmail}.` });
    const [pending] = await invitationsTo(withdrawnEmail);
    expect(pending).toMatchObject({ status: 'pending', role: 'viewer' });
    const withdrawn = await postForm(`/api/members/invitations/${pending!.id}`, { _method: 'DELETE', back }, admin);
    expect([withdrawn.status, flashOf(withdrawn)?.message]).toEqual([303, 'Invitation withdrawn.']);
    expect((await invitationsTo(withdrawnEmail))[0]?.status).toBe('canceled');

    const email = uniqueEmail('form-member');
    expect((await postForm('/api/members', { email, role: 'viewer', back }, admin)).status).toBe(303);
    const [invitation] = await invitationsTo(email);
    await signUp({ name: 'Form Member', email, invitationId: invitation!.id });
    const memberOf = () =>
      db
        .selectFrom('member')
        .select(['id', 'role'])
        .where('organizationId', '=', trustId)
        .where('userId', 'in', db.selectFrom('user').select('id').where('email', '=', email))
        .executeTakeFirst();
    const member = (await memberOf())!;
    const noMethod = await postForm(`/api/members/${member.id}`, { role: 'finance_lead', back }, admin);
    expect([noMethod.status, flashOf(noMethod)?.kind]).toEqual([303, 'error']);
    expect((await memberOf())?.role).toBe('viewer');
    const changed = await postForm(
      `/api/members/${member.id}`,
      { _method: 'PATCH', role: 'finance_lead', limitSchools: 'all', accessEndsOn: '', back },
      admin,
    );
    expect([changed.status, flashOf(changed)]).toEqual([303, { kind: 'ok', message: 'Saved.' }]);
    expect((await memberOf())?.role).toBe('finance_lead');
    const removed = await postForm(`/api/members/${member.id}`, { _method: 'DELETE', back }, admin);
    expect([removed.status, flashOf(removed)?.message]).toEqual([303, 'Member removed.']);
    expect(await memberOf()).toBeUndefined();
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('trust_id', '=', trustId)
      .where('action', 'like', 'member.%')
      .orderBy('id')
      .execute();
    expect(audit.map((a) => a.action)).toEqual(
      expect.arrayContaining([
        'member.invited',
        'member.invitation_cancelled',
        'member.role_changed',
        'member.removed',
      ]),
    );
  });

  it('lists only the active trust’s members, and hides another trust’s member as 404', async () => {
    const other = await createOtherTrust();
    const list = await json<{ members: { email: string }[] }>(await api('/api/members', { cookie: other.cookie }));
    expect(list.members.map((m) => m.email)).toEqual([other.email]);
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const { members } = await json<{ members: { id: string; email: string }[] }>(
      await api('/api/members', { cookie: admin }),
    );
    const viewer = members.find((m) => m.email === DEMO_ACCOUNTS.viewer)!;
    const attempt = await api(`/api/members/${viewer.id}`, { method: 'DELETE', cookie: other.cookie });
    expect(attempt.status).toBe(404);
    expect(await db.selectFrom('member').select('id').where('id', '=', viewer.id).executeTakeFirst()).toBeDefined();
  });

  it('limits a member to chosen schools, ends access on the end date, and audits the role change', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const email = uniqueEmail('consultant');
    const invite = await json<{ invitation: { id: string } }>(
      await api('/api/members', { method: 'POST', cookie: admin, body: JSON.stringify({ email, role: 'viewer' }) }),
    );
    const cookie = await signUp({ name: 'Consultant', email, invitationId: invite.invitation.id });
    const { members } = await json<{ members: { id: string; email: string }[] }>(
      await api('/api/members', { cookie: admin }),
    );
    const memberId = members.find((m) => m.email === email)!.id;
    const school = await db
      .selectFrom('schools')
      .select('id')
      .where('trust_id', '=', 'demo-trust')
      .orderBy('name')
      .executeTakeFirstOrThrow();

    const limit = await api(`/api/members/${memberId}`, {
      method: 'PATCH',
      cookie: admin,
      body: JSON.stringify({ role: 'finance_lead', schoolIds: [school.id] }),
    });
    expect(limit.status).toBe(200);
    const account = await json<AccountBody>(await api('/api/account', { cookie }));
    expect(account.trust).toMatchObject({ role: 'finance_lead', schoolIds: [school.id] });
    const visible = await json<{ schools: { id: string }[] }>(await api('/api/schools', { cookie }));
    expect(visible.schools.map((s) => s.id)).toEqual([school.id]);
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'before', 'after'])
      .where('entity_id', '=', memberId)
      .where('action', '=', 'member.role_changed')
      .executeTakeFirst();
    expect(audit?.before).toMatchObject({ role: 'viewer' });
    expect(audit?.after).toMatchObject({ role: 'finance_lead' });

    const today = new Date().toISOString().slice(0, 10);
    expect(
      (
        await api(`/api/members/${memberId}`, {
          method: 'PATCH',
          cookie: admin,
          body: JSON.stringify({ accessEndsOn: today }),
        })
      ).status,
    ).toBe(200);
    expect((await api('/api/schools', { cookie })).status).toBe(403);
    const page = await api('/app/schools', { cookie });
    expect(page.status).toBe(303);
    expect(page.headers.get('location')).toBe('/app/account?notice=no-trust');
  });
});

describe('password reset', () => {
  // Each test uses a fresh account, so the only reset e-mail to it is the one asked for here.
  async function requestReset(email: string): Promise<string> {
    const response = await api('/api/auth/request-password-reset', {
      method: 'POST',
      body: JSON.stringify({ email, redirectTo: '/reset-password' }),
    });
    expect(response.status).toBe(200);
    const mail = await waitForMail(email, 'new Airtally password');
    return linkIn(mail, '/reset-password').searchParams.get('token') ?? '';
  }

  it('resets the password through the e-mailed link, once only', async () => {
    const { email } = await createOtherTrust();
    const token = await requestReset(email);
    const newPassword = 'a-brand-new-password-1';
    const form = new URLSearchParams({ token, password: newPassword, confirm: newPassword });
    const reset = await api('/reset-password', {
      method: 'POST',
      body: form.toString(),
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    });
    expect(reset.status).toBe(200);
    expect(await reset.text()).toContain('Your password has been changed');
    await expect(signIn(email, DEMO_PASSWORD)).rejects.toThrow(/401/);
    expect(await signIn(email, newPassword)).toContain('session_token');
    const audited = await db
      .selectFrom('audit_events')
      .select('action')
      .where('actor_email', '=', email)
      .where('action', '=', 'account.password_reset')
      .execute();
    expect(audited).toHaveLength(1);

    const reused = await api('/api/auth/reset-password', {
      method: 'POST',
      body: JSON.stringify({ token, newPassword: 'yet-another-password-2' }),
    });
    expect(reused.status).toBe(400);
  });

  it('refuses an expired reset link with a clear message', async () => {
    const { email } = await createOtherTrust();
    const token = await requestReset(email);
    await db
      .updateTable('verification')
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where('identifier', '=', `reset-password:${token}`)
      .execute();
    const form = new URLSearchParams({ token, password: 'another-password-3', confirm: 'another-password-3' });
    const reset = await api('/reset-password', {
      method: 'POST',
      body: form.toString(),
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    });
    expect(reset.status).toBe(400);
    expect(await reset.text()).toContain('expired or has already been used');
  });
});

describe('account page', () => {
  it('changes the password through /api/account/password, signs out the other sessions and audits the change', async () => {
    const { cookie, email } = await createOtherTrust();
    const elsewhere = await signIn(email);
    const response = await postForm(
      '/api/account/password',
      { currentPassword: DEMO_PASSWORD, newPassword: 'changed-password-4', back: '/app/account' },
      cookie,
    );
    expect(response.status).toBe(303);
    expect(response.headers.get('location')).toBe('/app/account');
    expect(flashOf(response)).toEqual({
      kind: 'ok',
      message: 'Your password has been changed. Other devices were signed out.',
    });
    // This device keeps working with the new session cookie the answer carries; the other one is signed out.
    const renewed = cookieFrom(response);
    expect(renewed).toContain('session_token');
    expect((await api('/api/account', { cookie: renewed })).status).toBe(200);
    expect((await api('/api/account', { cookie: elsewhere })).status).toBe(401);
    expect(await signIn(email, 'changed-password-4')).toContain('session_token');
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('actor_email', '=', email)
      .where('action', '=', 'account.password_changed')
      .execute();
    expect(audit).toHaveLength(1);
  });

  it('sends the form back with the reason when the current password is wrong, and keeps the password', async () => {
    const { cookie, email } = await createOtherTrust();
    const response = await postForm(
      '/api/account/password',
      { currentPassword: 'not-my-password', newPassword: 'changed-password-5', back: '/app/account' },
      cookie,
    );
    expect(response.status).toBe(303);
    expect(response.headers.get('location')).toBe('/app/account');
    expect(flashOf(response)?.message).toContain('Your current password is not right');
    // The page shows the message once, then no more.
    const page = await api('/app/account', { cookie: `${cookie}; ${cookieFrom(response)}` });
    expect(await page.text()).toContain('Your current password is not right');
    expect(await signIn(email)).toContain('session_token');
  });

  it('answers JSON clients with JSON: 400 with the reason for a short new password', async () => {
    const { cookie } = await createOtherTrust();
    const response = await api('/api/account/password', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ currentPassword: DEMO_PASSWORD, newPassword: 'short' }),
    });
    expect(response.status).toBe(400);
    expect((await json<{ error: { message: string } }>(response)).error.message).toMatch(/10 characters/);
  });

  it('sends a new confirmation link through /api/account/verification-email and audits it', async () => {
    const { cookie, email } = await createOtherTrust();
    const confirmations = async () =>
      (await listMail()).filter(
        (m) =>
          m.to.some((r) => r.address.toLowerCase() === email.toLowerCase()) &&
          m.subject.includes('Confirm your e-mail'),
      ).length;
    await waitFor('the sign-up confirmation arrives', async () => (await confirmations()) === 1);
    const response = await postForm('/api/account/verification-email', { back: '/app/account' }, cookie);
    expect(response.status).toBe(303);
    expect(flashOf(response)).toEqual({ kind: 'ok', message: `We have sent a new confirmation link to ${email}.` });
    await waitFor('the second confirmation arrives', async () => (await confirmations()) === 2);
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('actor_email', '=', email)
      .where('action', '=', 'account.verification_sent')
      .execute();
    expect(audit).toHaveLength(1);
  });

  it('signs out on every device through /api/account/sign-out-everywhere, this one included', async () => {
    const { cookie, email } = await createOtherTrust();
    const elsewhere = await signIn(email);
    const unconfirmed = await postForm('/api/account/sign-out-everywhere', { back: '/app/account' }, cookie);
    expect(unconfirmed.status).toBe(303);
    expect(flashOf(unconfirmed)?.kind).toBe('error');
    expect((await api('/api/account', { cookie })).status).toBe(200);

    const response = await postForm('/api/account/sign-out-everywhere', { everywhere: 'true' }, cookie);
    expect(response.status).toBe(303);
    expect(response.headers.get('location')).toBe('/sign-in?notice=signed-out');
    expect(response.headers.getSetCookie().some((c) => /session_token=;.*Max-Age=0/.test(c))).toBe(true);
    expect((await api('/api/account', { cookie })).status).toBe(401);
    expect((await api('/api/account', { cookie: elsewhere })).status).toBe(401);
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('actor_email', '=', email)
      .where('action', '=', 'account.signed_out_everywhere')
      .execute();
    expect(audit).toHaveLength(1);
  });

  it('refuses a form post to the account page itself (405): the page only shows', async () => {
    const { cookie, email } = await createOtherTrust();
    const response = await postForm(
      '/app/account',
      { action: 'change-password', currentPassword: DEMO_PASSWORD, newPassword: 'changed-password-6' },
      cookie,
    );
    expect(response.status).toBe(405);
    expect(await signIn(email)).toContain('session_token');
  });
});

describe('brute force', () => {
  it('refuses the sixth wrong password within a minute with 429, even when it is right', async () => {
    const { email } = await createOtherTrust();
    const attempt = (password: string) =>
      api('/api/auth/sign-in/email', { method: 'POST', body: JSON.stringify({ email, password }) });
    const statuses: number[] = [];
    for (let i = 0; i < 5; i += 1) statuses.push((await attempt(`wrong-password-${i}`)).status);
    expect(statuses).toEqual([401, 401, 401, 401, 401]);
    const sixth = await attempt(DEMO_PASSWORD);
    expect(sixth.status).toBe(429);
    expect(Number(sixth.headers.get('retry-after'))).toBeGreaterThan(0);
    expect((await json<{ error: { code: string } }>(sixth)).error.code).toBe('too_many_attempts');
  });
});

describe('sessions and cookies', () => {
  it('sets an httpOnly, SameSite=Lax session cookie and signs out everywhere', async () => {
    const response = await api('/api/auth/sign-in/email', {
      method: 'POST',
      body: JSON.stringify({ email: DEMO_ACCOUNTS.finance_lead, password: DEMO_PASSWORD }),
    });
    const setCookie = response.headers.getSetCookie().find((c) => c.includes('session_token')) ?? '';
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
    expect(setCookie).toMatch(/Max-Age=\d+/);
    const first = cookieFrom(response);
    const second = await signIn(DEMO_ACCOUNTS.finance_lead);
    const revoke = await api('/api/auth/revoke-sessions', { method: 'POST', cookie: second, body: '{}' });
    expect(revoke.status).toBe(200);
    expect((await api('/api/account', { cookie: first })).status).toBe(401);
    expect((await api('/api/account', { cookie: second })).status).toBe(401);
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('actor_email', '=', DEMO_ACCOUNTS.finance_lead)
      .where('action', '=', 'account.signed_out_everywhere')
      .execute();
    expect(audit).toHaveLength(1);
  });

  it('refuses a cross-site sign-in request', async () => {
    const response = await api('/api/auth/sign-in/email', {
      method: 'POST',
      headers: { origin: 'http://attacker.example' },
      body: JSON.stringify({ email: DEMO_ACCOUNTS.viewer, password: DEMO_PASSWORD }),
    });
    expect(response.status).toBe(403);
  });

  it('sends anonymous visitors of an app page to sign-in with the page to return to', async () => {
    const response = await api('/app/schools?page=2');
    expect(response.status).toBe(303);
    expect(response.headers.get('location')).toBe(`/sign-in?next=${encodeURIComponent('/app/schools?page=2')}`);
  });
});

describe('several trusts', () => {
  it('lets a member of two trusts switch between them, and asks them to choose after a fresh sign-in', async () => {
    const other = await createOtherTrust();
    const verify = linkIn(await waitForMail(other.email, 'Confirm your e-mail'), '/verify-email');
    expect((await api(`${verify.pathname}${verify.search}`, { cookie: other.cookie })).status).toBe(200);

    const email = uniqueEmail('two-trusts');
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const first = await json<{ invitation: { id: string } }>(
      await api('/api/members', { method: 'POST', cookie: admin, body: JSON.stringify({ email, role: 'viewer' }) }),
    );
    const cookie = await signUp({ name: 'Two Trusts', email, invitationId: first.invitation.id });
    const second = await api('/api/members', {
      method: 'POST',
      cookie: other.cookie,
      body: JSON.stringify({ email, role: 'finance_lead' }),
    });
    expect(second.status).toBe(201);
    const secondId = (await json<{ invitation: { id: string } }>(second)).invitation.id;
    expect(
      (
        await api('/api/account/accept-invitation', {
          method: 'POST',
          cookie,
          body: JSON.stringify({ invitationId: secondId }),
        })
      ).status,
    ).toBe(200);
    expect((await json<AccountBody>(await api('/api/account', { cookie }))).trust).toMatchObject({
      id: other.trustId,
      role: 'finance_lead',
    });

    const switched = await api('/api/account/active-trust', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ trustId: 'demo-trust' }),
    });
    expect(switched.status).toBe(200);
    expect((await json<AccountBody>(await api('/api/account', { cookie }))).trust).toMatchObject({
      id: 'demo-trust',
      role: 'viewer',
    });

    const fresh = await signIn(email);
    expect((await json<AccountBody>(await api('/api/account', { cookie: fresh }))).trust).toBeNull();
    const page = await api('/app/schools', { cookie: fresh });
    expect(page.headers.get('location')).toBe('/app/account?notice=no-trust');
  });
});
