import ExcelJS from 'exceljs';
import { sql } from 'kysely';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { commitImport, previewImport } from '../../src/lib/server/register/import.service';
import { testDb } from '../helpers/db';
import { commit, upload } from '../helpers/imports';
import { DEMO_ACCOUNTS, api, createOtherTrust, signIn } from '../helpers/session';
import { messyRegister, roomRow, tidyRegister } from '../unit/register/fixtures';

const db = testDb();
afterAll(() => db.destroy());

/** Everything of a trust's estate that an import could change, for before/after comparison. */
async function estateState(trustId: string) {
  const schools = await db.selectFrom('schools').selectAll().where('trust_id', '=', trustId).orderBy('name').execute();
  const ids = schools.map((s) => s.id);
  const blocks = ids.length
    ? await db.selectFrom('blocks').selectAll().where('school_id', 'in', ids).orderBy('name').execute()
    : [];
  const rooms = ids.length
    ? await db.selectFrom('rooms').selectAll().where('school_id', 'in', ids).orderBy('code').execute()
    : [];
  const audit = await db
    .selectFrom('audit_events')
    .select(sql<number>`count(*)::int`.as('n'))
    .where('trust_id', '=', trustId)
    .where('entity_type', 'in', ['room', 'school', 'block'])
    .executeTakeFirstOrThrow();
  return { schools, blocks, rooms, auditCount: audit.n };
}

describe('importing a register through the API', () => {
  let admin: { cookie: string; trustId: string };
  beforeAll(async () => {
    admin = await createOtherTrust();
  });

  it('previews a messy file with every problem by spreadsheet row and column, then commits only the valid rows', async () => {
    const before = await estateState(admin.trustId);
    const { status, body } = await upload(admin.cookie, 'fernhill survey.xlsx', await messyRegister());
    expect(status).toBe(201);
    expect(body).toMatchObject({
      status: 'previewed',
      summary: { schoolsToCreate: 1, roomsToCreate: 5, rowsRejected: 5, rowsSkipped: 1 },
    });
    expect(body.problems).toContainEqual(
      expect.objectContaining({ row: 13, column: 'Free area', columnLetter: 'J', severity: 'error' }),
    );
    expect(body.problems).toContainEqual(expect.objectContaining({ row: 7, column: 'GIA', value: 'TBC' }));
    // A preview writes nothing to the estate.
    expect(await estateState(admin.trustId)).toEqual(before);

    const committed = await commit(admin.cookie, body.id, { rows: 'valid', deleteMissing: false });
    expect(committed.status).toBe(200);
    expect(committed.body.outcome).toMatchObject({
      status: 'committed',
      roomsCreated: 5,
      schoolsCreated: 1,
      rowsRejected: 5,
    });
    const after = await estateState(admin.trustId);
    expect(after.rooms.map((r) => r.code)).toEqual(['G01', 'G02', 'H14', 'H15', 'K16']);
    expect(after.rooms.find((r) => r.code === 'H15')).toMatchObject({
      ventilation_type: 'heat_recovery_unit',
      pupils: 60,
      orientation_deg: 90,
    });
    expect(after.auditCount - before.auditCount).toBe(5 + 1 + 2);

    // The history lists it with who, when, file name, counts and outcome.
    const history = (await (await api('/api/imports', { cookie: admin.cookie })).json()) as any;
    expect(history.imports[0]).toMatchObject({
      id: body.id,
      fileName: 'fernhill survey.xlsx',
      status: 'committed',
      createdByEmail: expect.any(String),
      outcome: { roomsCreated: 5 },
    });
  });

  it('changes nothing when the same file is imported again', async () => {
    const before = await estateState(admin.trustId);
    const { body } = await upload(admin.cookie, 'fernhill survey.xlsx', await messyRegister());
    expect(body.summary).toMatchObject({
      roomsToCreate: 0,
      roomsToChange: 0,
      roomsUnchanged: 5,
      schoolsToCreate: 0,
      blocksToCreate: 0,
    });
    await commit(admin.cookie, body.id, { rows: 'valid', deleteMissing: false });
    expect(await estateState(admin.trustId)).toEqual(before);
  });

  it('round-trips: export → import changes nothing, for .xlsx and .csv', async () => {
    const before = await estateState(admin.trustId);
    for (const [path, name] of [
      ['/api/exports/register.xlsx', 'export.xlsx'],
      ['/api/exports/register.csv', 'export.csv'],
    ] as const) {
      const response = await api(path, { cookie: admin.cookie });
      expect(response.status, `${path}: ${response.status === 200 ? '' : await response.text()}`).toBe(200);
      const exported = Buffer.from(await response.arrayBuffer());
      const { status, body } = await upload(admin.cookie, name, exported);
      // The message says why, if the upload is refused.
      expect(status, `${name}: ${JSON.stringify(body.error ?? null)}`).toBe(201);
      expect(body.summary, name).toMatchObject({
        roomsToCreate: 0,
        roomsToChange: 0,
        rowsRejected: 0,
        roomsUnchanged: before.rooms.length,
        roomsMissing: 0,
      });
      expect(
        body.problems.filter((p: any) => p.severity === 'error'),
        name,
      ).toEqual([]);
      await commit(admin.cookie, body.id, { rows: 'valid', deleteMissing: true });
    }
    expect(await estateState(admin.trustId)).toEqual(before);
  });

  it('applies changed values and a move to a new block, and audits each change with its before and after', async () => {
    const exported = Buffer.from(
      await (await api('/api/exports/register.xlsx', { cookie: admin.cookie })).arrayBuffer(),
    );
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(exported as any);
    const sheet = wb.getWorksheet('Rooms')!;
    const headers = (sheet.getRow(1).values as unknown[]).map(String);
    const col = (header: string) => headers.indexOf(header);
    const [first, second] = [sheet.getRow(2), sheet.getRow(3)];
    const firstCode = String(first.getCell(col('Room code')).value);
    const secondCode = String(second.getCell(col('Room code')).value);
    first.getCell(col('Pupils')).value = 17;
    second.getCell(col('Block')).value = 'Annexe Z';
    const changed = Buffer.from(await wb.xlsx.writeBuffer());
    const before = await estateState(admin.trustId);

    const { body } = await upload(admin.cookie, 'changed.xlsx', changed);
    expect(body.summary).toMatchObject({ roomsToCreate: 0, roomsToChange: 2, blocksToCreate: 1, rowsRejected: 0 });
    const done = await commit(admin.cookie, body.id, { rows: 'valid', deleteMissing: false });
    expect(done.body.outcome).toMatchObject({ status: 'committed', roomsChanged: 2, blocksCreated: 1 });

    const after = await estateState(admin.trustId);
    const annexe = after.blocks.find((b) => b.name === 'Annexe Z')!;
    expect(after.rooms.find((r) => r.code === firstCode)).toMatchObject({ pupils: 17 });
    expect(after.rooms.find((r) => r.code === secondCode)).toMatchObject({ block_id: annexe.id });
    expect(after.rooms).toHaveLength(before.rooms.length);
    expect(after.auditCount - before.auditCount).toBe(2 + 1);
    const firstId = after.rooms.find((r) => r.code === firstCode)!.id;
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'summary', 'before', 'after'])
      .where('entity_id', '=', firstId)
      .where('action', '=', 'room.updated')
      .orderBy('id', 'desc')
      .executeTakeFirstOrThrow();
    expect(audit.summary).toMatch(new RegExp(`Changed room ${firstCode} from a register import \\(row 2\\)`));
    expect(audit.after).toEqual({ pupils: 17 });
    expect(audit.before).toEqual({ pupils: before.rooms.find((r) => r.code === firstCode)!.pupils });
  });

  it('writes formula-like text so no spreadsheet runs it, and reads it back unchanged', async () => {
    const room = (await estateState(admin.trustId)).rooms[0]!;
    const dangerous = '=HYPERLINK("http://evil.example.test","click")';
    const patched = await api(`/api/rooms/${room.id}`, {
      method: 'PATCH',
      cookie: admin.cookie,
      body: JSON.stringify({ notes: dangerous, name: '+44 call' }),
    });
    expect(patched.status).toBe(200);

    const xlsx = Buffer.from(await (await api('/api/exports/register.xlsx', { cookie: admin.cookie })).arrayBuffer());
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx as any);
    const sheet = wb.getWorksheet('Rooms')!;
    const values: unknown[] = [];
    sheet.eachRow((row) => values.push(...(row.values as unknown[])));
    expect(values).toContain(`'${dangerous}`);
    expect(values).toContain("'+44 call");
    for (let r = 1; r <= sheet.rowCount; r++)
      sheet.getRow(r).eachCell((cell) => expect(cell.type).not.toBe(ExcelJS.ValueType.Formula));

    const csv = await (await api('/api/exports/register.csv', { cookie: admin.cookie })).text();
    expect(csv).toContain(`"'=HYPERLINK(""http://evil.example.test"",""click"")"`);
    expect(csv).not.toMatch(/(^|,)=HYPERLINK/m);

    const { body } = await upload(admin.cookie, 'again.xlsx', xlsx);
    expect(body.summary).toMatchObject({ roomsToChange: 0, roomsToCreate: 0 });
    await commit(admin.cookie, body.id, { rows: 'none' });
  });

  it('lists rooms missing from the file and deletes them only when asked', async () => {
    const exported = Buffer.from(
      await (await api('/api/exports/register.xlsx', { cookie: admin.cookie })).arrayBuffer(),
    );
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(exported as any);
    const removedCode = String(wb.getWorksheet('Rooms')!.getCell('E2').value);
    wb.getWorksheet('Rooms')!.spliceRows(2, 1);
    const shorter = Buffer.from(await wb.xlsx.writeBuffer());
    const before = await estateState(admin.trustId);
    const first = await upload(admin.cookie, 'shorter.xlsx', shorter);
    // The message says why, if the upload is refused.
    expect(first.status, `shorter.xlsx: ${JSON.stringify(first.body.error ?? null)}`).toBe(201);
    expect(first.body.missingRooms).toEqual([expect.objectContaining({ code: removedCode })]);
    await commit(admin.cookie, first.body.id, { rows: 'valid', deleteMissing: false });
    expect((await estateState(admin.trustId)).rooms).toHaveLength(before.rooms.length);
    const second = await upload(admin.cookie, 'shorter.xlsx', shorter);
    expect(second.status, `shorter.xlsx again: ${JSON.stringify(second.body.error ?? null)}`).toBe(201);
    const done = await commit(admin.cookie, second.body.id, { rows: 'valid', deleteMissing: true });
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.outcome.roomsDeleted).toBe(1);
    expect((await estateState(admin.trustId)).rooms.map((r) => r.code)).not.toContain(removedCode);
  });

  it('cancelling leaves the estate as it was, and a used import cannot be committed again', async () => {
    const before = await estateState(admin.trustId);
    const { body } = await upload(admin.cookie, 'new.xlsx', await tidyRegister([roomRow('Fernhill Primary', 'NEW1')]));
    expect(body.summary.roomsToCreate).toBe(1);
    expect((await commit(admin.cookie, body.id, { rows: 'none' })).body.outcome.status).toBe('cancelled');
    expect(await estateState(admin.trustId)).toEqual(before);
    expect((await commit(admin.cookie, body.id, { rows: 'valid' })).status).toBe(409);
  });

  it('refuses to commit a preview when the register changed since (409), and writes nothing', async () => {
    const { body } = await upload(
      admin.cookie,
      'stale.xlsx',
      await tidyRegister([roomRow('Fernhill Primary', 'STALE1')]),
    );
    const room = (await estateState(admin.trustId)).rooms[0]!;
    expect(
      (
        await api(`/api/rooms/${room.id}`, {
          method: 'PATCH',
          cookie: admin.cookie,
          body: JSON.stringify({ adults: (room.adults ?? 0) + 1 }),
        })
      ).status,
    ).toBe(200);
    const before = await estateState(admin.trustId);
    const refused = await commit(admin.cookie, body.id, { rows: 'valid' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/changed since this preview/);
    expect(await estateState(admin.trustId)).toEqual(before);
  });

  it('refuses, at commit, an import that would go beyond the free plan (402) and writes nothing', async () => {
    const before = await estateState(admin.trustId);
    const { body } = await upload(
      admin.cookie,
      'two schools.xlsx',
      await tidyRegister([roomRow('Second School', 'A1')]),
    );
    const refused = await commit(admin.cookie, body.id, { rows: 'valid' });
    expect(refused.status).toBe(402);
    expect(refused.body.error.message).toMatch(/plan/);
    expect(await estateState(admin.trustId)).toEqual(before);
  });

  it("remembers a column mapping for the trust's next import", async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Rooms');
    ws.addRow(['School', 'Room code', 'Survey sqm', 'Ceiling height', 'Vent']);
    ws.addRow(['Fernhill Primary', 'G01', 55, 2.7, 'natural']);
    const bytes = Buffer.from(await wb.xlsx.writeBuffer());
    const first = await upload(admin.cookie, 'mapped.xlsx', bytes);
    expect(first.body.header.columns.find((c: any) => c.letter === 'C').field).toBeNull();
    await commit(admin.cookie, first.body.id, { rows: 'none' });
    const mapped = await upload(admin.cookie, 'mapped.xlsx', bytes, { mapping: JSON.stringify({ C: 'floorAreaM2' }) });
    expect(mapped.body.header.columns.find((c: any) => c.letter === 'C').field).toBe('floorAreaM2');
    await commit(admin.cookie, mapped.body.id, { rows: 'none' });
    const next = await upload(admin.cookie, 'mapped again.xlsx', bytes);
    expect(next.body.header.columns.find((c: any) => c.letter === 'C').field).toBe('floorAreaM2');
    await commit(admin.cookie, next.body.id, { rows: 'none' });
  });
});

describe('refusing bad uploads', () => {
  let admin: { cookie: string; trustId: string };
  beforeAll(async () => {
    admin = await createOtherTrust();
  });

  const corrupt: [string, () => Promise<Buffer> | Buffer, RegExp][] = [
    ['not a zip', () => Buffer.from('School,Room code\nA,B\n'), /plain text/],
    ['a truncated zip', async () => (await tidyRegister([roomRow('A', 'B')])).subarray(0, 3000), /cut short/],
    [
      'a PDF behind an .xlsx name',
      () => Buffer.concat([Buffer.from('%PDF-1.7\n'), Buffer.alloc(100, 0)]),
      /not a zip-based/,
    ],
  ];
  for (const [what, make, message] of corrupt) {
    it(`answers 400 with a clear message for ${what}, and the database is unchanged`, async () => {
      const before = await estateState(admin.trustId);
      const imports = await db
        .selectFrom('register_imports')
        .select(sql<number>`count(*)::int`.as('n'))
        .where('trust_id', '=', admin.trustId)
        .executeTakeFirstOrThrow();
      const { status, body } = await upload(admin.cookie, 'register.xlsx', await make());
      expect(status).toBe(400);
      expect(body.error.message).toMatch(message);
      expect(await estateState(admin.trustId)).toEqual(before);
      expect(
        (
          await db
            .selectFrom('register_imports')
            .select(sql<number>`count(*)::int`.as('n'))
            .where('trust_id', '=', admin.trustId)
            .executeTakeFirstOrThrow()
        ).n,
      ).toBe(imports.n);
    });
  }

  it('refuses a file over 20 MB up front', async () => {
    const { status, body } = await upload(admin.cookie, 'huge.csv', Buffer.alloc(21 * 1024 * 1024, 0x41));
    expect(status).toBe(413);
    expect(body.error.message).toMatch(/limit is 20 MB/);
  });

  it('refuses a file type we cannot read', async () => {
    const { status, body } = await upload(admin.cookie, 'register.pdf', Buffer.from('x'));
    expect(status).toBe(400);
    expect(body.error.message).toMatch(/\.xlsx.*\.csv/);
  });
});

describe('an import interrupted mid-commit', () => {
  it('leaves nothing behind when the database connection dies before the commit', async () => {
    const other = await createOtherTrust();
    const trust = { id: other.trustId, name: 'Other', role: 'trust_admin' as const, schoolIds: null };
    const actor = { actorUserId: null, actorEmail: other.email };
    const rows = Array.from({ length: 40 }, (_, i) => roomRow('Interrupted School', `R${i + 1}`));
    const preview = await previewImport(db, trust, actor, {
      fileName: 'interrupted.xlsx',
      bytes: await tidyRegister(rows),
    });
    expect(preview.summary.roomsToCreate).toBe(40);
    const before = await estateState(other.trustId);
    // A pool of its own whose clients tolerate being killed, so the cut connection does not crash the runner.
    const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
    pool.on('error', () => {});
    pool.on('connect', (client) => client.on('error', () => {}));
    let writtenInsideTransaction = 0;
    await expect(
      commitImport(pool, trust, actor, preview.id, { rows: 'valid', deleteMissing: false }, async (trx) => {
        writtenInsideTransaction = (
          await trx
            .selectFrom('rooms')
            .innerJoin('schools', 'schools.id', 'rooms.school_id')
            .where('schools.trust_id', '=', other.trustId)
            .select(sql<number>`count(*)::int`.as('n'))
            .executeTakeFirstOrThrow()
        ).n;
        // Kill our own connection, as a crash or a network cut would.
        await sql`SELECT pg_terminate_backend(pg_backend_pid())`.execute(trx);
      }),
    ).rejects.toThrow();
    await pool.end().catch(() => {});
    expect(writtenInsideTransaction).toBe(40);
    expect(await estateState(other.trustId)).toEqual(before);
    const stored = await db
      .selectFrom('register_imports')
      .select('status')
      .where('id', '=', preview.id)
      .executeTakeFirstOrThrow();
    expect(stored.status).toBe('previewed');
  });
});

describe('who may import, edit and export', () => {
  it('viewers and finance leads export but get 403 on import and edits', async () => {
    const file = await tidyRegister([roomRow('Any School', 'A1')]);
    for (const role of ['viewer', 'finance_lead'] as const) {
      const cookie = await signIn(DEMO_ACCOUNTS[role]);
      expect((await upload(cookie, 'r.xlsx', file)).status, role).toBe(403);
      expect((await api('/api/exports/register.xlsx', { cookie })).status, role).toBe(200);
      const rooms = (await (await api('/api/rooms?pageSize=1', { cookie })).json()) as any;
      const patch = await api(`/api/rooms/${rooms.rows[0].id}`, {
        method: 'PATCH',
        cookie,
        body: JSON.stringify({ pupils: 1 }),
      });
      expect(patch.status, role).toBe(403);
      expect(((await patch.json()) as any).error.code).toBe('forbidden');
    }
  });
});
