import type { Role } from './context';

/**
 * Permissions are data: each resource lists its actions, and each role the actions it holds.
 * The sign-in feature builds better-auth's access-control roles from these same statements,
 * so they are declared once.
 */
export const STATEMENTS = {
  estate: ['read'],
  register: ['create', 'update', 'delete', 'import', 'export'],
  assessment: ['read', 'run', 'export', 'manage'],
  assumptions: ['read', 'edit_technical', 'edit_financial'],
  portfolio: ['read', 'save_weights', 'export'],
  monitoring: ['read', 'import', 'calibrate'],
  programme: ['read', 'edit', 'export'],
  members: ['read', 'invite', 'update', 'remove'],
  billing: ['read', 'invoices', 'manage'],
  audit: ['read'],
} as const;

export type Resource = keyof typeof STATEMENTS;
export type Action<R extends Resource> = (typeof STATEMENTS)[R][number];
export type Grants = { [R in Resource]?: readonly Action<R>[] };

const READ_ALL: Grants = {
  estate: ['read'],
  assessment: ['read'],
  assumptions: ['read'],
  portfolio: ['read'],
  monitoring: ['read'],
  programme: ['read'],
  members: ['read'],
  billing: ['read'],
};

/** What each role may do (see the roles table in the README). */
export const ROLE_GRANTS: Record<Role, Grants> = {
  trust_admin: STATEMENTS,
  estates_manager: {
    ...READ_ALL,
    register: ['create', 'update', 'delete', 'import', 'export'],
    assessment: ['read', 'run', 'export'],
    assumptions: ['read', 'edit_technical'],
    portfolio: ['read', 'save_weights', 'export'],
    monitoring: ['read', 'import', 'calibrate'],
    programme: ['read', 'edit', 'export'],
  },
  finance_lead: {
    ...READ_ALL,
    // The invoices, to reconcile and pay them; changing the plan stays with the trust admin.
    billing: ['read', 'invoices'],
    register: ['export'],
    assessment: ['read', 'run', 'export'],
    assumptions: ['read', 'edit_financial'],
    portfolio: ['read', 'export'],
    programme: ['read', 'edit', 'export'],
  },
  viewer: {
    ...READ_ALL,
    register: ['export'],
    assessment: ['read', 'export'],
    portfolio: ['read', 'export'],
    programme: ['read', 'export'],
  },
};

/** True when `role` holds `action` on `resource`. */
export function can<R extends Resource>(role: Role, resource: R, action: Action<R>): boolean {
  const actions = ROLE_GRANTS[role][resource] as readonly string[] | undefined;
  return actions?.includes(action) ?? false;
}
