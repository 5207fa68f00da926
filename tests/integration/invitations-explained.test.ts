import { afterAll, describe, expect, it } from 'vitest';
import { createDb } from '../../src/lib/server/db/client';
import { listMail, waitForMail } from '../helpers/mail';
import { DEMO_ACCOUNTS, api, createOtherTrust, signIn, signUp, uniqueEmail } from '../helpers/session';

// Issue 14, item 8: the invitation e-mail explains itself, and its link proves the address.

const db = createDb(process.env.DATABASE_URL ?? '');
afterAll(async () => {
  await db.destroy();
});

const verified = async (email: string) =>
  (await db.selectFrom('user').select('emailVerified').where('email', '=', email).executeTakeFirstOrThrow())
    .emailVerified;

describe('invitation e-mail', () => {
  it('says the role in words, the schools by name, the access end date (en-GB) and who invited', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const schools = await db
      .selectFrom('schools')
      .select(['id', 'name'])
      .where('trust_id', '=', 'demo-trust')
      .orderBy('name')
      .limit(3)
      .execute();
    const chosen = schools.slice(0, 2);
    const other = schools[2];
    const inviter = await db
      .selectFrom('user')
      .select('name')
      .where('email', '=', DEMO_ACCOUNTS.trust_admin)
      .executeTakeFirstOrThrow();
    const email = uniqueEmail('explained');
    const response = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({
        email,
        role: 'estates_manager',
        schoolIds: chosen.map((s) => s.id),
        accessEndsOn: '2031-03-31',
      }),
    });
    expect(response.status).toBe(201);
    const mail = await waitForMail(email, 'invited you');
    expect(mail.text).toContain('Your role: Estates manager.');
    expect(mail.text).not.toContain('estates_manager');
    for (const school of chosen) expect(mail.text).toContain(school.name);
    if (other) expect(mail.text).not.toContain(other.name);
    expect(mail.text).toContain('limited to 2 schools');
    // 31 March 2031, written the en-GB way (day month year), as the app writes dates.
    expect(mail.text).toContain('Your access ends on 31 Mar 2031 (UK time)');
    expect(mail.text).toContain(inviter.name);
    expect(mail.text).toContain(DEMO_ACCOUNTS.trust_admin);
    expect(mail.html).toContain('Estates manager');
  });

  it('says when access is to every school and has no end date', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const email = uniqueEmail('explained-all');
    await api('/api/members', { method: 'POST', cookie: admin, body: JSON.stringify({ email, role: 'finance_lead' }) });
    const mail = await waitForMail(email, 'invited you');
    expect(mail.text).toContain('Your role: Finance lead.');
    expect(mail.text).toContain('every school of the trust');
    expect(mail.text).toContain('no end date');
  });
});

describe('accepting from the invitation link', () => {
  it('signs a new person up already verified, joined, with no confirmation link sent', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const email = uniqueEmail('invited-new');
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'viewer' }),
    });
    const { invitation } = (await invite.json()) as { invitation: { id: string } };
    const cookie = await signUp({ name: 'Invited Newcomer', email, invitationId: invitation.id });
    expect(await verified(email)).toBe(true);
    const account = (await (await api('/api/account', { cookie })).json()) as {
      user: { emailVerified: boolean };
      trust: { id: string; role: string } | null;
    };
    expect(account.user.emailVerified).toBe(true);
    expect(account.trust).toMatchObject({ id: 'demo-trust', role: 'viewer' });
    const confirmations = (await listMail()).filter(
      (m) => m.to.some((r) => r.address === email) && m.subject.includes('Confirm your e-mail'),
    );
    expect(confirmations).toEqual([]);
  });

  it('marks an existing unverified account verified when it accepts an invitation to its own address', async () => {
    const { cookie, email } = await createOtherTrust();
    expect(await verified(email)).toBe(false);
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'viewer' }),
    });
    const { invitation } = (await invite.json()) as { invitation: { id: string } };
    const accepted = await api('/api/account/accept-invitation', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ invitationId: invitation.id }),
    });
    expect(accepted.status).toBe(200);
    expect(await verified(email)).toBe(true);
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('actor_email', '=', email)
      .where('action', '=', 'account.verified_by_invitation')
      .execute();
    expect(audit).toHaveLength(1);
  });

  it('never verifies a different address: an invitation to A cannot be accepted by B, and B stays unverified', async () => {
    const other = await createOtherTrust();
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email: uniqueEmail('someone-else'), role: 'viewer' }),
    });
    const { invitation } = (await invite.json()) as { invitation: { id: string } };
    const refused = await api('/api/account/accept-invitation', {
      method: 'POST',
      cookie: other.cookie,
      body: JSON.stringify({ invitationId: invitation.id }),
    });
    expect(refused.status).toBeGreaterThanOrEqual(400);
    expect(refused.status).toBeLessThan(500);
    expect(await verified(other.email)).toBe(false);
  });
});
