import { sql, type Kysely } from 'kysely';

// Frozen migration: the room uses schools have beyond the first list: SEN / intervention rooms, small group rooms,
// drama and dance studios and dining rooms (the spaces of the Department for Education's area guidelines, BB103
// (2014) and BB104 (2015), recalled). The list of codes is copied here on purpose: a migration never imports app code.

const BEFORE = [
  'classroom',
  'science_lab',
  'practical',
  'ict_room',
  'music_room',
  'hall',
  'sports_hall',
  'library',
  'office',
  'staff_room',
  'other',
];
const ADDED = ['sen_room', 'group_room', 'studio', 'dining_room'];

const inList = (values: readonly string[]) => sql.raw(`use IN (${values.map((v) => `'${v}'`).join(', ')})`);

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('rooms').dropConstraint('rooms_use_known').execute();
  await db.schema
    .alterTable('rooms')
    .addCheckConstraint('rooms_use_known', inList([...BEFORE, ...ADDED]))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  // The earlier list has no code for the added uses: such rooms become 'other' so the old check holds.
  await db.updateTable('rooms').set({ use: 'other' }).where('use', 'in', ADDED).execute();
  await db.schema.alterTable('rooms').dropConstraint('rooms_use_known').execute();
  await db.schema.alterTable('rooms').addCheckConstraint('rooms_use_known', inList(BEFORE)).execute();
}
