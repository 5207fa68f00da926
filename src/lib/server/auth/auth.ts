import { betterAuth, type BetterAuthOptions } from 'better-auth';
import { APIError, createAuthMiddleware } from 'better-auth/api';
import { organization } from 'better-auth/plugins';
import type { Kysely } from 'kysely';
import { recordAudit } from '../audit/audit.repository';
import { runInBackground } from '../background';
import { getDb } from '../db/client';
import { CLIENT_IP_HEADER } from '../http/request-guard';
import { sendMail } from '../mail/mailer';
import { passwordResetMail, verificationMail } from '../mail/templates';
import { ac, roles } from './access';
import { authSecret, config as serverConfig } from '../config';

const INVITATION_SECONDS = 7 * 24 * 3600;
/** How long an e-mailed confirmation link works. */
export const VERIFICATION_SECONDS = 24 * 3600;

/** Account writes that better-auth performs itself, audited after they succeed. */
const AUDITED_ACCOUNT_WRITES: Record<string, { action: string; summary: string }> = {
  '/change-password': { action: 'account.password_changed', summary: 'changed their password' },
  '/revoke-sessions': { action: 'account.signed_out_everywhere', summary: 'signed out on every device' },
  '/revoke-other-sessions': { action: 'account.signed_out_elsewhere', summary: 'signed out on their other devices' },
  '/revoke-session': { action: 'account.session_revoked', summary: 'signed out one device' },
};

/** Records the audited account writes (see AUDITED_ACCOUNT_WRITES) for API and page callers alike. */
// biome-ignore lint/suspicious/noExplicitAny: better-auth's schema generator passes an untyped Kysely instance.
function auditAccountWrites(db: Kysely<any>) {
  return createAuthMiddleware(async (ctx) => {
    const write = AUDITED_ACCOUNT_WRITES[ctx.path];
    const user = ctx.context.session?.user;
    if (!write || !user || ctx.context.returned instanceof Error) return;
    await recordAudit(db, {
      trustId: null,
      actorUserId: user.id,
      actorEmail: user.email,
      action: write.action,
      entityType: 'user',
      entityId: user.id,
      summary: `${user.email} ${write.summary}`,
    });
  });
}

/** The payload of a verification token, read without checking its signature (better-auth checks that). */
function tokenPayload(token: unknown): Record<string, unknown> | null {
  if (typeof token !== 'string') return null;
  try {
    const part = token.split('.')[1] ?? '';
    const payload: unknown = JSON.parse(Buffer.from(part, 'base64url').toString('utf8'));
    return payload && typeof payload === 'object' ? (payload as Record<string, unknown>) : null;
  } catch {
    return null;
  }
}

/**
 * Changing one's e-mail address is not a feature: a verification token that asks for one (better-auth's
 * `updateTo` flows) is refused before better-auth acts on it, however it is signed.
 */
const refuseEmailChange = createAuthMiddleware(async (ctx) => {
  if (ctx.path !== '/verify-email') return;
  const payload = tokenPayload((ctx.query as { token?: unknown } | undefined)?.token);
  if (payload && ('updateTo' in payload || 'requestType' in payload)) {
    throw new APIError('BAD_REQUEST', { code: 'INVALID_TOKEN', message: 'This link cannot be used.' });
  }
});

/**
 * better-auth's organization plugin, with trusts as organisations: the plugin's organisation model is
 * mapped onto our `trusts` table, so every organisation is a trust row with the same id.
 */
function organizationPlugin() {
  return organization({
    ac,
    roles,
    creatorRole: 'trust_admin',
    invitationExpiresIn: INVITATION_SECONDS,
    cancelPendingInvitationsOnReInvite: true,
    schema: { organization: { modelName: 'trusts', fields: { createdAt: 'created_at' } } },
    // The invitation e-mail is sent by members.service (inviteMember) once the school limit and end date are stored,
    // so it can say them; the plugin's own sending is a no-op.
    sendInvitationEmail: async () => {},
  });
}

/** The options of our better-auth instance over a given Kysely database (also used to generate its schema). */
// biome-ignore lint/suspicious/noExplicitAny: better-auth's schema generator passes an untyped Kysely instance.
export function createAuthOptions(db: Kysely<any>) {
  const { origin, auth: config } = serverConfig();
  return {
    appName: 'Airtally',
    baseURL: origin,
    basePath: '/api/auth',
    secret: authSecret(),
    trustedOrigins: [origin],
    database: { db, type: 'postgres' as const },
    emailAndPassword: {
      enabled: true,
      // Sign-up answers alike whether or not the address has an account (no enumeration), so it signs
      // nobody in: the e-mailed confirmation link does (autoSignInAfterVerification).
      autoSignIn: false,
      requireEmailVerification: false,
      minPasswordLength: 10,
      maxPasswordLength: 128,
      resetPasswordTokenExpiresIn: 3600,
      revokeSessionsOnPasswordReset: true,
      sendResetPassword: async ({ user, token }) => {
        await sendMail(passwordResetMail(user, `${origin}/reset-password?token=${encodeURIComponent(token)}`));
      },
      onPasswordReset: async ({ user }) => {
        await recordAudit(db, {
          trustId: null,
          actorUserId: user.id,
          actorEmail: user.email,
          action: 'account.password_reset',
          entityType: 'user',
          entityId: user.id,
          summary: `${user.email} chose a new password through the e-mailed link`,
        });
      },
    },
    emailVerification: {
      // Sent by our sign-up once the trust or membership exists (account.service.ts).
      sendOnSignUp: false,
      autoSignInAfterVerification: true,
      expiresIn: VERIFICATION_SECONDS,
      sendVerificationEmail: async ({ user, token }) => {
        await sendMail(verificationMail(user, `${origin}/verify-email?token=${encodeURIComponent(token)}`));
      },
      afterEmailVerification: async (user) => {
        await recordAudit(db, {
          trustId: null,
          actorUserId: user.id,
          actorEmail: user.email,
          action: 'account.email_verified',
          entityType: 'user',
          entityId: user.id,
          summary: `${user.email} confirmed their e-mail address`,
        });
      },
    },
    session: { expiresIn: config.sessionSeconds, updateAge: 24 * 3600 },
    hooks: { before: refuseEmailChange, after: auditAccountWrites(db) },
    rateLimit: {
      enabled: true,
      storage: 'memory',
      window: 60,
      max: Math.max(200, config.signInPerMinutePerAddress * 2),
      customRules: {
        '/sign-in/email': { window: 60, max: config.signInPerMinutePerAddress },
        '/request-password-reset': { window: 60, max: 10 },
        '/send-verification-email': { window: 60, max: 10 },
      },
    },
    // Writes that must be audited, validated against our rules or tied to a trust go through our own
    // routes (src/pages/api/members, src/pages/api/account), which call these endpoints on the server.
    disabledPaths: [
      '/sign-up/email',
      '/organization/create',
      '/organization/update',
      '/organization/delete',
      '/organization/invite-member',
      '/organization/cancel-invitation',
      '/organization/accept-invitation',
      '/organization/reject-invitation',
      '/organization/update-member-role',
      '/organization/remove-member',
      '/organization/add-member',
      '/organization/leave',
      '/organization/set-active',
      '/delete-user',
      '/change-email',
      '/update-user',
      // E-mailed links open our /verify-email page, which calls better-auth on the server.
      '/verify-email',
    ],
    advanced: {
      useSecureCookies: config.secureCookies,
      defaultCookieAttributes: { sameSite: 'lax', httpOnly: true, secure: config.secureCookies },
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
      // E-mails go out after the response, so answers take the same time whether or not one is sent.
      backgroundTasks: { handler: (task: Promise<unknown>) => runInBackground('auth e-mail', () => task) },
    },
    plugins: [organizationPlugin()],
  } satisfies BetterAuthOptions;
}

function create() {
  return betterAuth(createAuthOptions(getDb()));
}

let instance: ReturnType<typeof create> | undefined;

/** The process-wide better-auth instance, sharing our Kysely instance and pg pool. */
export function getAuth() {
  instance ??= create();
  return instance;
}
