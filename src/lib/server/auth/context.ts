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

/** What each role may do, in a sentence (the invitation e-mail says it). */
export const ROLE_MEANS: Record<Role, string> = {
  trust_admin:
    'A trust admin can do everything: manage the estate and its register, run assessments, change any assumption, invite and remove members, and manage billing.',
  estates_manager:
    'An estates manager can add and edit schools, rooms and the register, import files and monitor logs, run assessments, change the technical assumptions and plan programmes.',
  finance_lead:
    'A finance lead can see everything, run assessments, change the financial assumptions (prices, discount rate) and plan programmes.',
  viewer: 'A viewer can see the estate, the results and the programmes and export them, but change nothing.',
};
