import { sql, type Kysely } from 'kysely';

// Frozen migration: sign-in, sessions, members and invitations.
// The better-auth statements below were generated once with better-auth 1.7.25's getMigrations()
// (compileMigrations) for our auth options and copied here verbatim, so the schema is ours and versioned.
// Trusts are better-auth organisations: the plugin's organisation model is mapped onto `trusts`,
// which only needs the two columns it lacks (logo, metadata).
// Below them: our additions — one membership per person and trust, roles checked, school limits and end dates.

const ROLES = ['trust_admin', 'estates_manager', 'finance_lead', 'viewer'];
const roleList = sql.raw(ROLES.map((r) => `'${r}'`).join(', '));

const BETTER_AUTH_SQL = [
  `alter table "trusts" add column "logo" text`,
  `alter table "trusts" add column "metadata" text`,
  `create table "user" ("id" text not null primary key, "name" text not null, "email" text not null unique, "emailVerified" boolean not null, "image" text, "createdAt" timestamptz default CURRENT_TIMESTAMP not null, "updatedAt" timestamptz default CURRENT_TIMESTAMP not null)`,
  `create table "session" ("id" text not null primary key, "expiresAt" timestamptz not null, "token" text not null unique, "createdAt" timestamptz default CURRENT_TIMESTAMP not null, "updatedAt" timestamptz not null, "ipAddress" text, "userAgent" text, "userId" text not null references "user" ("id") on delete cascade, "activeOrganizationId" text)`,
  `create table "account" ("id" text not null primary key, "accountId" text not null, "providerId" text not null, "userId" text not null references "user" ("id") on delete cascade, "accessToken" text, "refreshToken" text, "idToken" text, "accessTokenExpiresAt" timestamptz, "refreshTokenExpiresAt" timestamptz, "scope" text, "password" text, "createdAt" timestamptz default CURRENT_TIMESTAMP not null, "updatedAt" timestamptz not null)`,
  `create table "verification" ("id" text not null primary key, "identifier" text not null, "value" text not null, "expiresAt" timestamptz not null, "createdAt" timestamptz default CURRENT_TIMESTAMP not null, "updatedAt" timestamptz default CURRENT_TIMESTAMP not null)`,
  `create table "member" ("id" text not null primary key, "organizationId" text not null references "trusts" ("id") on delete cascade, "userId" text not null references "user" ("id") on delete cascade, "role" text not null, "createdAt" timestamptz not null)`,
  `create table "invitation" ("id" text not null primary key, "organizationId" text not null references "trusts" ("id") on delete cascade, "email" text not null, "role" text, "status" text not null, "expiresAt" timestamptz not null, "createdAt" timestamptz default CURRENT_TIMESTAMP not null, "inviterId" text not null references "user" ("id") on delete cascade)`,
  `create index "session_userId_idx" on "session" ("userId")`,
  `create index "account_userId_idx" on "account" ("userId")`,
  `create index "verification_identifier_idx" on "verification" ("identifier")`,
  `create index "member_organizationId_idx" on "member" ("organizationId")`,
  `create index "member_userId_idx" on "member" ("userId")`,
  `create index "invitation_organizationId_idx" on "invitation" ("organizationId")`,
  `create index "invitation_email_idx" on "invitation" ("email")`,
];

export async function up(db: Kysely<any>): Promise<void> {
  for (const statement of BETTER_AUTH_SQL) await sql.raw(statement).execute(db);

  await sql`ALTER TABLE "member" ADD CONSTRAINT member_one_per_trust UNIQUE ("organizationId", "userId")`.execute(db);
  await sql`ALTER TABLE "member" ADD CONSTRAINT member_role_known CHECK (role IN (${roleList}))`.execute(db);
  await sql`ALTER TABLE "invitation" ADD CONSTRAINT invitation_role_known CHECK (role IS NULL OR role IN (${roleList}))`.execute(
    db,
  );
  // A session whose trust is deleted simply has no active trust.
  await sql`ALTER TABLE "session" ADD CONSTRAINT session_active_trust_fk FOREIGN KEY ("activeOrganizationId") REFERENCES trusts (id) ON DELETE SET NULL`.execute(
    db,
  );

  // Limits on a membership: the date access ends, and whether it is limited to chosen schools.
  await db.schema
    .createTable('membership_limits')
    .addColumn('member_id', 'text', (c) => c.primaryKey().references('member.id').onDelete('cascade'))
    .addColumn('limited_to_schools', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('access_ends_on', 'date')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema
    .createTable('membership_schools')
    .addColumn('member_id', 'text', (c) => c.notNull().references('member.id').onDelete('cascade'))
    .addColumn('school_id', 'uuid', (c) => c.notNull().references('schools.id').onDelete('cascade'))
    .addPrimaryKeyConstraint('membership_schools_pk', ['member_id', 'school_id'])
    .execute();
  await sql`CREATE TRIGGER membership_limits_set_updated_at BEFORE UPDATE ON membership_limits
    FOR EACH ROW EXECUTE FUNCTION set_updated_at()`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('membership_schools').execute();
  await db.schema.dropTable('membership_limits').execute();
  for (const table of ['invitation', 'member', 'verification', 'account', 'session', 'user']) {
    await db.schema.dropTable(table).execute();
  }
  await db.schema.alterTable('trusts').dropColumn('metadata').execute();
  await db.schema.alterTable('trusts').dropColumn('logo').execute();
}
