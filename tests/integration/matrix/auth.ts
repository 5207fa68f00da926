import { all, signedIn, type MatrixEntry } from './types';

const adminOnly = (adminStatus: number, otherTrust: number) => ({
  anonymous: 401,
  viewer: 403,
  finance_lead: 403,
  estates_manager: 403,
  school_limited: 403,
  trust_admin: adminStatus,
  other_trust: otherTrust,
});

/** Sign-in, account and members API. The other trust's admin has not confirmed their e-mail address. */
export const entries: MatrixEntry[] = [
  {
    file: 'auth/[...all].ts',
    method: 'GET',
    path: '/api/auth/get-session',
    expect: all(200),
    note: 'better-auth answers null for anonymous callers',
  },
  {
    file: 'auth/[...all].ts',
    method: 'GET',
    path: '/api/auth/organization/get-full-organization?organizationId=demo-trust',
    expect: all(404),
    note: 'the organization plugin is reachable only through our member and account routes',
  },
  { file: 'account/index.ts', method: 'GET', path: '/api/account', expect: signedIn(200) },
  {
    file: 'account/sign-up.ts',
    method: 'POST',
    path: '/api/account/sign-up',
    body: { email: 'not-an-address' },
    expect: all(400),
    note: 'public; invalid input',
  },
  {
    file: 'account/active-trust.ts',
    method: 'POST',
    path: '/api/account/active-trust',
    body: { trustId: 'demo-trust' },
    expect: { ...signedIn(200), other_trust: 403 },
    note: 'only members may switch to a trust',
  },
  {
    file: 'account/accept-invitation.ts',
    method: 'POST',
    path: '/api/account/accept-invitation',
    body: { invitationId: 'no-such-invitation' },
    expect: signedIn(404),
  },
  {
    file: 'members/index.ts',
    method: 'GET',
    path: '/api/members',
    expect: signedIn(200),
    note: 'each trust lists its own members',
  },
  {
    file: 'members/index.ts',
    method: 'POST',
    path: '/api/members',
    body: (c) => ({ email: c.uniqueEmail(), role: 'viewer' }),
    expect: adminOnly(201, 403),
    note: 'the other trust admin may invite but has not confirmed their address',
  },
  {
    file: 'members/[id].ts',
    method: 'PATCH',
    path: '/api/members/demo-user-viewer-member',
    body: { role: 'viewer' },
    expect: adminOnly(200, 404),
    note: 'a member of another trust is not found',
  },
  { file: 'members/[id].ts', method: 'DELETE', path: '/api/members/no-such-member', expect: adminOnly(404, 404) },
  {
    file: 'members/invitations/[id].ts',
    method: 'DELETE',
    path: '/api/members/invitations/no-such-invitation',
    expect: adminOnly(404, 404),
  },
];
