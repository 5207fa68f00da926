/** Who is asking, as the middleware puts it on Astro.locals. */
export interface SessionUser {
  id: string;
  email: string;
  name: string;
  emailVerified: boolean;
}

export const ROLES = ['trust_admin', 'estates_manager', 'finance_lead', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

/** The trust a request acts in, the member's role, and the schools the membership is limited to (null = all). */
export interface ActiveTrust {
  id: string;
  name: string;
  role: Role;
  schoolIds: string[] | null;
}

/** How each role is named to people (pages, e-mails). */
export const ROLE_LABELS: Record<Role, string> = {
  trust_admin: 'Trust admin',
  estates_manager: 'Estates manager',
  finance_lead: 'Finance lead',
  viewer: 'Viewer',
};
