import { forbidden, unauthenticated } from '../http/errors';
import { emailUnverified, limitedToSchools } from './auth.errors';
import type { ActiveTrust, SessionUser } from './context';
import { can, type Action, type Resource } from './permissions';

/** The active trust of a signed-in member; 401 without a session, 403 without a trust. */
export function requireTrust(locals: App.Locals): ActiveTrust {
  if (!locals.trust) {
    if (!locals.user) throw unauthenticated();
    throw forbidden('use Airtally without a trust');
  }
  return locals.trust;
}

const ACTION_WORDS: Record<string, string> = {
  read: 'see this',
  create: 'add records',
  update: 'change records',
  delete: 'delete records',
  import: 'import or change this',
  calibrate: 'calibrate rooms from measurements',
  export: 'export this',
  run: 'run assessments',
  edit_technical: 'change technical assumptions',
  edit_financial: 'change financial assumptions',
  save_weights: 'save ranking weights for the trust',
  edit: 'create or change capital programmes',
  invite: 'invite members',
  remove: 'remove members',
  manage: 'manage the plan and billing',
};

/** The active trust, provided the member's role holds `action` on `resource`; otherwise 401/403. */
export function requirePermission<R extends Resource>(locals: App.Locals, resource: R, action: Action<R>): ActiveTrust {
  const trust = requireTrust(locals);
  if (!can(trust.role, resource, action)) throw forbidden(ACTION_WORDS[action] ?? `${action} ${resource}`);
  return trust;
}

/**
 * The signed-in person, provided they have confirmed their e-mail address (needed to invite people
 * or start a paid plan); 401 when signed out, 403 `email_unverified` otherwise.
 */
export function requireVerifiedEmail(locals: App.Locals): SessionUser {
  if (!locals.user) throw unauthenticated();
  if (!locals.user.emailVerified) throw emailUnverified(locals.user.email);
  return locals.user;
}

/**
 * 403 for a member limited to some schools: `action` changes what applies to every school of the trust
 * (assumptions, the unit catalogue, ranking weights, billing, adding schools).
 */
export function requireWholeTrust(trust: ActiveTrust, action: string): ActiveTrust {
  if (trust.schoolIds !== null) throw limitedToSchools(`${action}: it applies to every school in the trust`);
  return trust;
}

/** Whether the member may do `action` on `resource` where it applies to every school (pages offer it or not). */
export function mayChangeTrustWide<R extends Resource>(trust: ActiveTrust, resource: R, action: Action<R>): boolean {
  return trust.schoolIds === null && can(trust.role, resource, action);
}
