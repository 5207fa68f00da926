import type { ColumnType, Generated } from 'kysely';

// better-auth's tables keep its camelCase column names (see db/migrations/20261201T1000_auth.ts).
// better-auth writes them through its own adapter; our code reads them and writes the limits.

type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;

export interface UserTable {
  id: string;
  name: string;
  email: string;
  emailVerified: boolean;
  image: string | null;
  createdAt: Timestamp;
  updatedAt: Timestamp;
}

export interface SessionTable {
  id: string;
  expiresAt: Timestamp;
  token: string;
  createdAt: Timestamp;
  updatedAt: Timestamp;
  ipAddress: string | null;
  userAgent: string | null;
  userId: string;
  activeOrganizationId: string | null;
}

export interface AccountTable {
  id: string;
  accountId: string;
  providerId: string;
  userId: string;
  accessToken: string | null;
  refreshToken: string | null;
  idToken: string | null;
  accessTokenExpiresAt: Timestamp | null;
  refreshTokenExpiresAt: Timestamp | null;
  scope: string | null;
  password: string | null;
  createdAt: Timestamp;
  updatedAt: Timestamp;
}

export interface VerificationTable {
  id: string;
  identifier: string;
  value: string;
  expiresAt: Timestamp;
  createdAt: Timestamp;
  updatedAt: Timestamp;
}

/** A person's membership of a trust (better-auth organisation member) with their role. */
export interface MemberTable {
  id: string;
  organizationId: string;
  userId: string;
  role: string;
  createdAt: Timestamp;
}

export interface InvitationTable {
  id: string;
  organizationId: string;
  email: string;
  role: string | null;
  status: string;
  expiresAt: Timestamp;
  createdAt: Timestamp;
  inviterId: string;
}

/** Limits on a membership: an end date (ISO date, access stops on that day) and whether schools are chosen. */
export interface MembershipLimitsTable {
  member_id: string;
  limited_to_schools: Generated<boolean>;
  access_ends_on: ColumnType<string | null, string | null | undefined, string | null>;
  created_at: ColumnType<Date, never, never>;
  updated_at: ColumnType<Date, never, Date | undefined>;
}

/** The schools a limited membership may see. */
export interface MembershipSchoolsTable {
  member_id: string;
  school_id: string;
}

/** Limits chosen when inviting someone, applied to the membership on acceptance. */
export interface InvitationLimitsTable {
  invitation_id: string;
  limited_to_schools: Generated<boolean>;
  access_ends_on: ColumnType<string | null, string | null | undefined, string | null>;
}

/** The schools an invitation's membership will be limited to. */
export interface InvitationSchoolsTable {
  invitation_id: string;
  school_id: string;
}

/** Tables of the sign-in, sessions, members and invitations (better-auth) plus membership limits feature. */
export interface AuthTables {
  user: UserTable;
  session: SessionTable;
  account: AccountTable;
  verification: VerificationTable;
  member: MemberTable;
  invitation: InvitationTable;
  membership_limits: MembershipLimitsTable;
  membership_schools: MembershipSchoolsTable;
  invitation_limits: InvitationLimitsTable;
  invitation_schools: InvitationSchoolsTable;
}
