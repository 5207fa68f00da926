import type { Kysely } from 'kysely';

// Frozen migration (sign-in feature; named after the newest migration so existing databases still migrate in order):
// limits chosen when inviting someone (schools, end date), copied onto the
// membership when the invitation is accepted.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('invitation_limits')
    .addColumn('invitation_id', 'text', (c) => c.primaryKey().references('invitation.id').onDelete('cascade'))
    .addColumn('limited_to_schools', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('access_ends_on', 'date')
    .execute();
  await db.schema
    .createTable('invitation_schools')
    .addColumn('invitation_id', 'text', (c) => c.notNull().references('invitation.id').onDelete('cascade'))
    .addColumn('school_id', 'uuid', (c) => c.notNull().references('schools.id').onDelete('cascade'))
    .addPrimaryKeyConstraint('invitation_schools_pk', ['invitation_id', 'school_id'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('invitation_schools').execute();
  await db.schema.dropTable('invitation_limits').execute();
}
