import { createAccessControl } from 'better-auth/plugins/access';
import { defaultStatements } from 'better-auth/plugins/organization/access';
import { ROLES, type Role } from './context';
import { ROLE_GRANTS, STATEMENTS } from './permissions';

/**
 * better-auth's access control, built from our permission table (permissions.ts) merged with the
 * organization plugin's own statements, so invitations and member management keep working and our
 * roles are declared once.
 */
export const ac = createAccessControl({ ...defaultStatements, ...STATEMENTS });

/** What each role may do inside the organization plugin (members, invitations). */
const PLUGIN_GRANTS: Record<Role, Partial<Record<keyof typeof defaultStatements, string[]>>> = {
  trust_admin: {
    organization: ['update', 'delete'],
    member: ['create', 'update', 'delete'],
    invitation: ['create', 'cancel'],
    team: [],
    ac: ['read'],
  },
  estates_manager: { ac: ['read'] },
  finance_lead: { ac: ['read'] },
  viewer: { ac: ['read'] },
};

/** The four Airtally roles as better-auth roles. */
export const roles = Object.fromEntries(
  ROLES.map((role) => [role, ac.newRole({ ...PLUGIN_GRANTS[role], ...ROLE_GRANTS[role] } as never)]),
) as unknown as Record<Role, ReturnType<typeof ac.newRole>>;

/** True when `value` names one of our roles (invitations and role changes are validated with it). */
export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}
