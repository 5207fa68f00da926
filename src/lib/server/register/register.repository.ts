import { sql, type Kysely, type Transaction } from 'kysely';
import type pg from 'pg';
import { bytePieces, copyLine, copyLines } from '../db/copy';
import type { Database } from '../../../../db/database';
import type { ClimateRegion, HeatingFuel, SchoolPhase } from '../../engine/vocabulary';
import type { AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from '../estate/estate.repository';
import type { RegisterField } from './columns';
import type { SavedMappings } from './headers';
import type { EstateSnapshot, ImportPlan, Ref, RoomWrite } from './plan';
import type { RoomFields } from '../estate/estate.schemas';
import { roomFieldsOf } from '../estate/rooms.repository';

type Db = Kysely<Database> | Transaction<Database>;
type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** Room columns in the order the bulk writer stages them. */
const ROOM_COLUMNS = [
  ['code', 'text', 'code'],
  ['name', 'text', 'name'],
  ['use', 'text', 'use'],
  ['floor_area_m2', 'float8', 'floorAreaM2'],
  ['ceiling_height_m', 'float8', 'ceilingHeightM'],
  ['pupils', 'int4', 'pupils'],
  ['adults', 'int4', 'adults'],
  ['age_group', 'text', 'ageGroup'],
  ['orientation_deg', 'int4', 'orientationDeg'],
  ['glazing_area_m2', 'float8', 'glazingAreaM2'],
  ['openable_area_m2', 'float8', 'openableAreaM2'],
  ['window_type', 'text', 'windowType'],
  ['frame_material', 'text', 'frameMaterial'],
  ['glazing_g_value', 'float8', 'glazingGValue'],
  ['ventilation_type', 'text', 'ventilationType'],
  ['mechanical_supply_lps', 'float8', 'mechanicalSupplyLps'],
  ['winter_window_open_fraction', 'float8', 'winterWindowOpenFraction'],
  ['notes', 'text', 'notes'],
] as const satisfies readonly (readonly [string, string, keyof RoomFields])[];

/** The trust's schools, blocks and rooms as the import compares against them. */
export async function loadSnapshot(db: Db, trust: ActiveTrust): Promise<EstateSnapshot> {
  const schools = await db
    .selectFrom('schools')
    .select(['id', 'name', 'phase', 'climate_region', 'heating_fuel', 'fuel_price_gbp_per_kwh', 'heating_efficiency'])
    .where(inTrustScope(trust))
    .execute();
  const ids = schools.map((s) => s.id);
  const blocks = ids.length ? await db.selectFrom('blocks').selectAll().where('school_id', 'in', ids).execute() : [];
  const rooms = ids.length ? await db.selectFrom('rooms').selectAll().where('school_id', 'in', ids).execute() : [];
  const regionCounts = new Map<string, number>();
  for (const s of schools) regionCounts.set(s.climate_region, (regionCounts.get(s.climate_region) ?? 0) + 1);
  const defaultClimateRegion = ([...regionCounts].sort((a, b) => b[1] - a[1])[0]?.[0] ?? 'midlands') as ClimateRegion;
  return {
    schools: schools.map((s) => ({
      id: s.id,
      name: s.name,
      phase: s.phase as SchoolPhase,
      heatingFuel: s.heating_fuel as HeatingFuel,
      fuelPriceGbpPerKwh: s.fuel_price_gbp_per_kwh,
      heatingEfficiency: s.heating_efficiency,
    })),
    blocks: blocks.map((b) => ({
      id: b.id,
      schoolId: b.school_id,
      name: b.name,
      yearBuilt: b.year_built,
      airPermeabilityM3hM2: b.air_permeability_m3h_m2,
      heatingFuel: b.heating_fuel as HeatingFuel | null,
      fuelPriceGbpPerKwh: b.fuel_price_gbp_per_kwh,
      heatingEfficiency: b.heating_efficiency,
    })),
    rooms: rooms.map((r) => ({ id: r.id, schoolId: r.school_id, blockId: r.block_id, fields: roomFieldsOf(r) })),
    defaultClimateRegion,
    canCreateSchools: trust.schoolIds === null,
  };
}

/**
 * A cheap fingerprint of the trust's estate: how many schools, blocks and rooms, and when each
 * last changed. Any insert, update or delete since the preview changes it.
 */
export async function estateFingerprint(db: Db, trust: ActiveTrust): Promise<string> {
  const { rows } = await sql<{ f: string }>`
    SELECT concat_ws('|',
      (SELECT count(*) || '@' || coalesce(max(updated_at)::text, '') FROM schools WHERE ${inTrustScope(trust)}),
      (SELECT count(*) || '@' || coalesce(max(b.updated_at)::text, '') FROM blocks b JOIN schools ON schools.id = b.school_id WHERE ${inTrustScope(trust)}),
      (SELECT count(*) || '@' || coalesce(max(r.updated_at)::text, '') FROM rooms r JOIN schools ON schools.id = r.school_id WHERE ${inTrustScope(trust)})
    ) AS f`.execute(db);
  return rows[0]?.f ?? '';
}

/** The trust's remembered header → field mappings. */
export async function loadSavedMappings(db: Db, trustId: string): Promise<SavedMappings> {
  const rows = await db
    .selectFrom('register_column_mappings')
    .select(['header_key', 'field'])
    .where('trust_id', '=', trustId)
    .execute();
  return new Map(rows.map((r) => [r.header_key, r.field as RegisterField]));
}

/** Remembers the user's mapping of these headers for the trust's next import. */
export async function saveMappings(
  db: Db,
  trustId: string,
  pairs: { headerKey: string; field: RegisterField }[],
): Promise<void> {
  const values = pairs
    .filter((p) => p.headerKey !== '')
    .map((p) => ({ trust_id: trustId, header_key: p.headerKey, field: p.field }));
  if (!values.length) return;
  await db
    .insertInto('register_column_mappings')
    .values(values)
    .onConflict((oc) =>
      oc
        .columns(['trust_id', 'header_key'])
        .doUpdateSet({ field: (eb) => eb.ref('excluded.field'), updated_at: sql`now()` }),
    )
    .execute();
}

const AUDIT_CHUNK = 5000;

/** School and block fields an import may change, with their columns. */
const SCHOOL_IMPORT_COLUMNS = {
  phase: 'phase',
  heatingFuel: 'heating_fuel',
  fuelPriceGbpPerKwh: 'fuel_price_gbp_per_kwh',
  heatingEfficiency: 'heating_efficiency',
} as const;
const BLOCK_IMPORT_COLUMNS = {
  yearBuilt: 'year_built',
  airPermeabilityM3hM2: 'air_permeability_m3h_m2',
  heatingFuel: 'heating_fuel',
  fuelPriceGbpPerKwh: 'fuel_price_gbp_per_kwh',
  heatingEfficiency: 'heating_efficiency',
} as const;

/** A change's fields as table columns (fields without a column are ignored). */
function columnsOf(
  after: Record<string, string | number | null>,
  columns: Record<string, string>,
): Record<string, never> {
  const out: Record<string, unknown> = {};
  for (const [field, value] of Object.entries(after)) {
    const column = columns[field];
    if (column) out[column] = value;
  }
  return out as Record<string, never>;
}

/** The columns of a staged room write, in the order of its COPY line (see stagedRoomLine). */
const STAGED_COLUMNS = [
  'row_number',
  'room_id',
  'school_id',
  'school_key',
  'block_id',
  'block_key',
  ...ROOM_COLUMNS.map(([c]) => c),
  'before',
  'after',
];

/**
 * One room write as a line of COPY text for the commit's staging table: the row number, the room
 * (null when new), its school and block as an id or the key of one the import creates, the room's
 * fields, and for a changed room the changed values before and after as JSON (for the audit trail).
 */
export function stagedRoomLine(w: RoomWrite): string {
  const values: (string | number | null)[] = [
    w.rowNumber,
    w.roomId,
    'id' in w.school ? w.school.id : null,
    'newKey' in w.school ? w.school.newKey : null,
    w.block && 'id' in w.block ? w.block.id : null,
    w.block && 'newKey' in w.block ? w.block.newKey : null,
  ];
  for (const [, , key] of ROOM_COLUMNS) values.push(w.fields[key] as string | number | null);
  values.push(w.roomId ? JSON.stringify(w.before) : null, w.roomId ? JSON.stringify(w.after) : null);
  return copyLine(values);
}

/** An import plan as stored between preview and commit: everything but the room writes, which travel as COPY text. */
export type StoredPlan = Omit<ImportPlan, 'roomWrites' | 'problems' | 'roomChanges'>;

/**
 * Writes an import plan: new schools and blocks, school and block changes, rooms upserted in bulk,
 * all audited. The room writes (COPY text from stagedRoomLine) are streamed into a temporary table
 * and applied from there by a few set-based statements, never row by row.
 */
export async function applyPlan(
  trx: Transaction<Database>,
  client: pg.PoolClient,
  trustId: string,
  actor: Actor,
  plan: StoredPlan,
  roomLines: Buffer,
  deleteMissing: boolean,
): Promise<{ roomsDeleted: number }> {
  const audit: AuditEntry[] = [];
  const base = { trustId, ...actor };
  const schoolIds = new Map<string, string>();
  const blockIds = new Map<string, string>();
  const resolve = (ref: Ref, ids: Map<string, string>) => ('id' in ref ? ref.id : (ids.get(ref.newKey) ?? null));

  if (plan.newSchools.length) {
    const created = await trx
      .insertInto('schools')
      .values(
        plan.newSchools.map((s) => ({
          trust_id: trustId,
          name: s.name,
          phase: s.phase,
          climate_region: s.climateRegion,
          ...(s.heatingFuel ? { heating_fuel: s.heatingFuel } : {}),
          fuel_price_gbp_per_kwh: s.fuelPriceGbpPerKwh ?? null,
          heating_efficiency: s.heatingEfficiency ?? null,
        })),
      )
      .returning(['id', 'name'])
      .execute();
    const idByName = new Map(created.map((r) => [r.name, r.id]));
    for (const s of plan.newSchools) {
      const id = idByName.get(s.name) ?? null;
      if (id) schoolIds.set(s.key, id);
      audit.push({
        ...base,
        action: 'school.created',
        entityType: 'school',
        entityId: id,
        summary: `Created school ${s.name} from a register import`,
        after: s,
      });
    }
  }
  for (const c of plan.schoolChanges) {
    await trx.updateTable('schools').set(columnsOf(c.after, SCHOOL_IMPORT_COLUMNS)).where('id', '=', c.id).execute();
    audit.push({
      ...base,
      action: 'school.updated',
      entityType: 'school',
      entityId: c.id,
      summary: `Changed ${Object.keys(c.after).join(', ')} of ${c.name}`,
      before: c.before,
      after: c.after,
    });
  }
  const blocksToCreate = plan.newBlocks
    .map((b) => ({ b, schoolId: resolve(b.school, schoolIds) }))
    .filter((x) => x.schoolId);
  if (blocksToCreate.length) {
    const created = await trx
      .insertInto('blocks')
      .values(
        blocksToCreate.map(({ b, schoolId }) => ({
          school_id: schoolId as string,
          name: b.name,
          year_built: b.yearBuilt,
          air_permeability_m3h_m2: b.airPermeabilityM3hM2,
          heating_fuel: b.heatingFuel ?? null,
          fuel_price_gbp_per_kwh: b.fuelPriceGbpPerKwh ?? null,
          heating_efficiency: b.heatingEfficiency ?? null,
        })),
      )
      .returning(['id', 'school_id', 'name'])
      .execute();
    const idByKey = new Map(created.map((r) => [`${r.school_id}|${r.name}`, r.id]));
    for (const { b, schoolId } of blocksToCreate) {
      const id = idByKey.get(`${schoolId}|${b.name}`) ?? null;
      if (id) blockIds.set(b.key, id);
      audit.push({
        ...base,
        action: 'block.created',
        entityType: 'block',
        entityId: id,
        summary: `Created block ${b.name} from a register import`,
        after: b,
      });
    }
  }
  for (const c of plan.blockChanges) {
    await trx.updateTable('blocks').set(columnsOf(c.after, BLOCK_IMPORT_COLUMNS)).where('id', '=', c.id).execute();
    audit.push({
      ...base,
      action: 'block.updated',
      entityType: 'block',
      entityId: c.id,
      summary: `Changed block ${c.name}`,
      before: c.before,
      after: c.after,
    });
  }

  if (roomLines.length > 0) {
    const roomColumns = ROOM_COLUMNS.map(([c]) => c);
    const columnTypes = ROOM_COLUMNS.map(([c, type]) => `${c} ${type}`).join(', ');
    await sql`CREATE TEMP TABLE import_rows (
        id uuid NOT NULL DEFAULT gen_random_uuid(), row_number int4, room_id uuid, school_id uuid, school_key text, block_id uuid, block_key text,
        ${sql.raw(columnTypes)}, before text, after text
      ) ON COMMIT DROP`.execute(trx);
    await copyLines(client, `COPY import_rows (${STAGED_COLUMNS.join(', ')}) FROM STDIN`, bytePieces(roomLines));
    // Schools and blocks this import created, by the keys the staged rows name them with.
    const created = (ids: Map<string, string>) => sql`unnest(${[...ids.keys()]}::text[], ${[...ids.values()]}::uuid[])`;
    const resolved = sql`import_rows r
      LEFT JOIN ${created(schoolIds)} AS s(key, id) ON s.key = r.school_key
      LEFT JOIN ${created(blockIds)} AS b(key, id) ON b.key = r.block_key`;
    const pick = sql.raw(roomColumns.map((c) => `r.${c}`).join(', '));
    if (plan.summary.roomsToCreate > 0) {
      await sql`INSERT INTO rooms (id, school_id, block_id, ${sql.raw(roomColumns.join(', '))})
        SELECT r.id, coalesce(r.school_id, s.id), coalesce(r.block_id, b.id), ${pick} FROM ${resolved} WHERE r.room_id IS NULL`.execute(
        trx,
      );
      const roomJson = sql.raw(`jsonb_build_object(${ROOM_COLUMNS.map(([c, , key]) => `'${key}', ${c}`).join(', ')})`);
      await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, after)
        SELECT ${trustId}, ${actor.actorUserId}, ${actor.actorEmail}, 'room.created', 'room', id::text,
          'Created room ' || code || ' from a register import (row ' || row_number || ')', ${roomJson}
        FROM import_rows WHERE room_id IS NULL ORDER BY row_number`.execute(trx);
    }
    if (plan.summary.roomsToChange > 0) {
      // Statistics, so the join to rooms goes by primary key rather than scanning every trust's rooms.
      await sql`ANALYZE import_rows`.execute(trx);
      const assignments = sql.raw(roomColumns.map((c) => `${c} = r.${c}`).join(', '));
      await sql`UPDATE rooms SET block_id = coalesce(r.block_id, b.id), ${assignments}
        FROM ${resolved} WHERE rooms.id = r.room_id`.execute(trx);
      await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, before, after)
        SELECT ${trustId}, ${actor.actorUserId}, ${actor.actorEmail}, 'room.updated', 'room', room_id::text,
          'Changed room ' || code || ' from a register import (row ' || row_number || ')', before::jsonb, after::jsonb
        FROM import_rows WHERE room_id IS NOT NULL ORDER BY row_number`.execute(trx);
    }
  }

  let roomsDeleted = 0;
  if (deleteMissing && plan.missingRooms.length) {
    const ids = plan.missingRooms.map((r) => r.id);
    const deleted = await trx.deleteFrom('rooms').where('id', 'in', ids).returning(['id', 'code']).execute();
    roomsDeleted = deleted.length;
    for (const r of plan.missingRooms) {
      audit.push({
        ...base,
        action: 'room.deleted',
        entityType: 'room',
        entityId: r.id,
        summary: `Deleted room ${r.code} of ${r.schoolName}: not in the imported register`,
        before: r,
      });
    }
  }
  for (let start = 0; start < audit.length; start += AUDIT_CHUNK)
    await recordAuditInBulk(trx, audit.slice(start, start + AUDIT_CHUNK));
  return { roomsDeleted };
}

/**
 * The same rows recordAudit writes, sent as column arrays in one statement: an import of
 * 100,000 rooms writes 100,000 audit events, and this keeps that to a few round trips.
 */
async function recordAuditInBulk(trx: Transaction<Database>, entries: AuditEntry[]): Promise<void> {
  if (entries.length === 0) return;
  const col = <T>(f: (e: AuditEntry) => T) => entries.map(f);
  const json = (v: unknown) => (v === undefined ? null : JSON.stringify(v));
  await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, before, after)
    SELECT t, u, e, a, et, ei, s, b::jsonb, af::jsonb FROM unnest(
      ${col((e) => e.trustId)}::text[], ${col((e) => e.actorUserId)}::text[], ${col((e) => e.actorEmail)}::text[], ${col((e) => e.action)}::text[],
      ${col((e) => e.entityType)}::text[], ${col((e) => e.entityId)}::text[], ${col((e) => e.summary)}::text[],
      ${col((e) => json(e.before))}::text[], ${col((e) => json(e.after))}::text[]
    ) AS x(t, u, e, a, et, ei, s, b, af)`.execute(trx);
}

/** Every room of the trust as a register record, ordered by school, block and room code (for export). */
export async function listRegisterRecords(db: Db, trust: ActiveTrust): Promise<import('./workbook').RegisterRecord[]> {
  const rows = await db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .leftJoin('blocks', 'blocks.id', 'rooms.block_id')
    .where(inTrustScope(trust))
    .selectAll('rooms')
    .select([
      'schools.name as school_name',
      'schools.phase as school_phase',
      'blocks.name as block_name',
      'blocks.year_built',
      'blocks.air_permeability_m3h_m2',
      'schools.heating_fuel as school_fuel',
      'schools.fuel_price_gbp_per_kwh as school_price',
      'schools.heating_efficiency as school_efficiency',
      'blocks.heating_fuel as block_fuel',
      'blocks.fuel_price_gbp_per_kwh as block_price',
      'blocks.heating_efficiency as block_efficiency',
    ])
    .orderBy('schools.name')
    .orderBy('blocks.name')
    .orderBy('rooms.code')
    .execute();
  return rows.map((r) => ({
    school: r.school_name,
    schoolPhase: r.school_phase,
    block: r.block_name,
    yearBuilt: r.year_built,
    code: r.code,
    name: r.name,
    use: r.use,
    floorAreaM2: r.floor_area_m2,
    ceilingHeightM: r.ceiling_height_m,
    pupils: r.pupils,
    adults: r.adults,
    ageGroup: r.age_group,
    orientationDeg: r.orientation_deg,
    glazingAreaM2: r.glazing_area_m2,
    openableAreaM2: r.openable_area_m2,
    windowType: r.window_type,
    ventilationType: r.ventilation_type,
    mechanicalSupplyLps: r.mechanical_supply_lps,
    airPermeabilityM3hM2: r.air_permeability_m3h_m2,
    glazingGValue: r.glazing_g_value,
    frameMaterial: r.frame_material,
    winterWindowOpenFraction: r.winter_window_open_fraction === null ? null : 100 * r.winter_window_open_fraction,
    schoolHeatingFuel: r.school_fuel,
    schoolFuelPriceGbpPerKwh: r.school_price,
    schoolHeatingEfficiency: r.school_efficiency,
    blockHeatingFuel: r.block_fuel,
    blockFuelPriceGbpPerKwh: r.block_price,
    blockHeatingEfficiency: r.block_efficiency,
    notes: r.notes,
  }));
}
