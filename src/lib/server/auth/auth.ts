import { betterAuth, type BetterAuthOptions } from 'better-auth';
import { createAuthMiddleware } from 'better-auth/api';
import { organization } from 'better-auth/plugins';
import type { Kysely } from 'kysely';
import { recordAudit } from '../audit/audit.repository';
import { getDb } from '../db/client';
import { sendMail } from '../mail/mailer';
import { invitationMail, passwordResetMail, verificationMail } from '../mail/templates';
import { ac, isRole, roles } from './access';
import { authConfig } from './auth-config';
import { ROLE_LABELS } from './context';

/** The header our auth route fills with the caller's address, so rate limits work on loopback too. */
export const CLIENT_IP_HEADER = 'x-airtally-client-ip';

const INVITATION_SECONDS = 7 * 24 * 3600;

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

/**
 * better-auth's organization plugin, with trusts as organisations: the plugin's organisation model is
 * mapped onto our `trusts` table, so every organisation is a trust row with the same id.
 */
function organizationPlugin(origin: string) {
  return organization({
    ac,
    roles,
    creatorRole: 'trust_admin',
    invitationExpiresIn: INVITATION_SECONDS,
    cancelPendingInvitationsOnReInvite: true,
    schema: { organization: { modelName: 'trusts', fields: { createdAt: 'created_at' } } },
    sendInvitationEmail: async ({ id, email, role, organization: trust, inviter, invitation }) => {
      const roleLabel = isRole(role) ? ROLE_LABELS[role] : role;
      await sendMail(
        invitationMail(email, {
          trustName: trust.name,
          inviterName: inviter.user.name || inviter.user.email,
          roleLabel: roleLabel.toLowerCase(),
          url: `${origin}/accept-invitation?id=${encodeURIComponent(id)}`,
          expiresAt: new Date(invitation.expiresAt),
        }),
      );
    },
  });
}

/** The options of our better-auth instance over a given Kysely database (also used to generate its schema). */
// biome-ignore lint/suspicious/noExplicitAny: better-auth's schema generator passes an untyped Kysely instance.
export function createAuthOptions(db: Kysely<any>) {
  const config = authConfig();
  return {
    appName: 'Airtally',
    baseURL: config.origin,
    basePath: '/api/auth',
    secret: config.secret,
    trustedOrigins: [config.origin],
    database: { db, type: 'postgres' as const },
    emailAndPassword: {
      enabled: true,
      autoSignIn: true,
      requireEmailVerification: false,
      minPasswordLength: 10,
      maxPasswordLength: 128,
      resetPasswordTokenExpiresIn: 3600,
      revokeSessionsOnPasswordReset: true,
      sendResetPassword: async ({ user, token }) => {
        await sendMail(passwordResetMail(user, `${config.origin}/reset-password?token=${encodeURIComponent(token)}`));
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
      sendOnSignUp: true,
      expiresIn: 24 * 3600,
      sendVerificationEmail: async ({ user, token }) => {
        await sendMail(verificationMail(user, `${config.origin}/verify-email?token=${encodeURIComponent(token)}`));
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
    hooks: { after: auditAccountWrites(db) },
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
    ],
    advanced: {
      useSecureCookies: config.secureCookies,
      defaultCookieAttributes: { sameSite: 'lax', httpOnly: true, secure: config.secureCookies },
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
    },
    plugins: [organizationPlugin(config.origin)],
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
