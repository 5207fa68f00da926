import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, signInInBrowser } from '../helpers/browser';
import { removeDemoMembersAddedSince, testDb } from '../helpers/db';
import { linkIn, waitForMail } from '../helpers/mail';
import { DEMO_ACCOUNTS, uniqueEmail } from '../helpers/session';

describe('inviting a colleague in Chromium', () => {
  const db = testDb();
  const startedAt = new Date();
  let adminBrowser: BrowserContext;
  let inviteeBrowser: BrowserContext;
  beforeAll(async () => {
    adminBrowser = await launchBrowser();
    inviteeBrowser = await launchBrowser();
  });
  afterAll(async () => {
    await adminBrowser?.close();
    await inviteeBrowser?.close();
    await removeDemoMembersAddedSince(db, startedAt);
    await db.destroy();
  });

  it('a trust admin invites by e-mail; the colleague follows the link, creates an account, confirms it and works as a finance lead', async () => {
    const email = uniqueEmail('browser-invitee');
    const admin = await adminBrowser.newPage();
    await signInInBrowser(admin, DEMO_ACCOUNTS.trust_admin);
    await admin.goto('/app/settings/members');
    const form = admin.getByTestId('invite-form');
    await form.getByLabel('E-mail address').fill(email);
    await form.getByLabel('Role').selectOption('finance_lead');
    await form.getByRole('button', { name: 'Send invitation' }).click();
    expect(await admin.getByTestId('notice-ok').textContent()).toContain(`Invitation sent to ${email}`);
    expect(await admin.getByTestId('invitations').textContent()).toContain(email);

    const link = linkIn(await waitForMail(email, 'invited you'), '/accept-invitation');
    const invitee = await inviteeBrowser.newPage();
    await invitee.goto(link.href);
    expect(await invitee.getByRole('heading', { level: 1 }).textContent()).toBe(
      'Join Brackenmoor Valley Learning Trust',
    );
    await invitee.getByLabel('Your name').fill('Browser Invitee');
    await invitee.getByLabel('Password').fill('a-good-long-password');
    await invitee.getByRole('button', { name: 'Create account and join' }).click();
    expect(await invitee.getByTestId('notice-ok').textContent()).toContain(`We have sent an e-mail to ${email}`);
    // The invitation's own link proved the address: the account is ready, no confirmation link is asked for.
    const ready = await waitForMail(email, 'account is ready');
    expect(ready.text).not.toContain('/verify-email');
    await invitee.getByRole('link', { name: 'sign in' }).click();
    await invitee.getByLabel('E-mail address').fill(email);
    await invitee.getByLabel('Password').fill('a-good-long-password');
    await invitee.getByRole('button', { name: 'Sign in' }).click();
    await invitee.waitForURL((url) => url.pathname === '/app/schools' || url.pathname === '/app');
    expect(await invitee.getByTestId('active-role').textContent()).toBe('finance lead');

    // The link cannot be used twice.
    await invitee.goto(link.href);
    expect(await invitee.getByRole('alert').textContent()).toContain('already been used');
  });
});
