// A run's chunks read exactly the rooms fixed when the run started (issue 16): every snapshot room once, in id order,
// with its own school, block and evidence (the active calibration only, and the room's measured analysis), a room
// deleted since skipped, and nothing of another trust.
import { sql } from 'kysely';
import { afterAll, describe, expect, it } from 'vitest';
import { getDb } from '../../src/lib/server/db/client';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { readChunkRooms } from '../../src/lib/server/assessments/engine-input.repository';
import { insertRun, markFailed } from '../../src/lib/server/assessments/runs.repository';
import { bigTrust } from '../helpers/big-trust';

const db = getDb();
const runIds: string[] = [];
afterAll(async () => {
  // The runs were only read, never worked: closed so no worker or other test takes them.
  for (const id of runIds) await markFailed(db, id, 'Test over.');
  await db.destroy();
});

const activeCalibration = { windowUseFactor: { winter: 0.6 }, infiltrationLps: 4.5, label: 'calibrated (test)' };
const revertedCalibration = { windowUseFactor: { winter: 2 }, infiltrationLps: null, label: 'reverted (test)' };
const analysis = { marker: 'measured analysis (test)', days: 12 };

describe('reading a run chunk by chunk', () => {
  it('gives every snapshot room once with its own school, block and evidence, and skips a room deleted since', async () => {
    const trust = await bigTrust(db, 12, 2);
    // Another trust's rooms share the tables and must never appear.
    const other = await bigTrust(db, 6, 1);
    await db
      .updateTable('blocks')
      .set({ year_built: 1931, air_permeability_m3h_m2: 12.5 })
      .where('school_id', '=', trust.schoolIds[1]!)
      .execute();
    const rooms = await db
      .selectFrom('rooms')
      .select(['id', 'code', 'school_id', 'block_id'])
      .where('school_id', 'in', trust.schoolIds)
      .orderBy('id')
      .execute();
    expect(rooms).toHaveLength(12);
    const [calibrated, reverted, measured, deleted] = [rooms[1]!, rooms[4]!, rooms[7]!, rooms[10]!];
    const calibrationRow = (roomId: string, version: number, status: 'active' | 'reverted', calibration: object) => ({
      trust_id: trust.trustId,
      room_id: roomId,
      version,
      status,
      days_used: 12,
      label: (calibration as { label: string }).label,
      calibration: JSON.stringify(calibration),
      fit: JSON.stringify({}),
      assumptions_version: 'test',
      created_by_email: 'chunk-read@test.airtally.test',
    });
    await db
      .insertInto('room_calibrations')
      .values([
        calibrationRow(calibrated.id, 1, 'active', activeCalibration),
        calibrationRow(reverted.id, 1, 'reverted', revertedCalibration),
      ])
      .execute();
    await db
      .insertInto('monitor_room_analyses')
      .values({
        room_id: measured.id,
        trust_id: trust.trustId,
        school_id: measured.school_id,
        days: 12,
        first_date: '2026-01-12',
        last_date: '2026-01-23',
        result: JSON.stringify(analysis),
        criterion_pack_id: 'test',
        assumptions_version: 'test',
      })
      .execute();

    const assumptions = await getCurrentAssumptionSet(db, trust.trustId);
    const run = await insertRun(
      db,
      {
        trustId: trust.trustId,
        schoolId: null,
        assumptionSetId: assumptions.id,
        assumptionsVersion: assumptions.label,
        startedByUserId: null,
        startedByEmail: 'chunk-read@test.airtally.test',
      },
      5,
    );
    runIds.push(run.id);
    expect(run.chunksTotal).toBe(3);
    await db.deleteFrom('rooms').where('id', '=', deleted.id).execute();
    // A room added after the start waits for the next run.
    await sql`INSERT INTO rooms (school_id, block_id, code, name, use, floor_area_m2)
      VALUES (${calibrated.school_id}::uuid, ${calibrated.block_id}::uuid, 'LATE-1', 'Added later', 'classroom', 55)`.execute(
      db,
    );

    const chunks = await db
      .selectFrom('assessment_run_chunks')
      .select(['chunk_no', 'room_ids'])
      .where('run_id', '=', run.id)
      .orderBy('chunk_no')
      .execute();
    const read = [];
    for (const chunk of chunks) {
      const inChunk = await readChunkRooms(db, { runId: run.id, chunkNo: chunk.chunk_no });
      expect(inChunk.map((r) => r.roomId)).toEqual(inChunk.map((r) => r.roomId).sort());
      read.push(...inChunk);
    }

    expect(read.map((r) => r.roomId)).toEqual(rooms.filter((r) => r.id !== deleted.id).map((r) => r.id));
    // The chunks keep the rooms of the start (5, 5 and 2 in id order), the deleted one included.
    expect(chunks.map((c) => c.room_ids.length)).toEqual([5, 5, 2]);
    expect(chunks.flatMap((c) => c.room_ids)).toEqual(rooms.map((r) => r.id));
    const otherRooms = await db.selectFrom('rooms').select('id').where('school_id', 'in', other.schoolIds).execute();
    expect(read.some((r) => otherRooms.some((o) => o.id === r.roomId))).toBe(false);
    for (const room of read) {
      const stored = rooms.find((r) => r.id === room.roomId)!;
      expect(room.roomCode).toBe(stored.code);
      expect(room.trustId).toBe(trust.trustId);
      expect(room.schoolId).toBe(stored.school_id);
      expect(room.blockId).toBe(stored.block_id);
      const secondSchool = stored.school_id === trust.schoolIds[1];
      expect(room.input.block.yearBuilt).toBe(secondSchool ? 1931 : 1970);
      expect(room.input.block.airPermeabilityM3hM2).toBe(secondSchool ? 12.5 : null);
      expect(room.input.school.phase).toBe('secondary');
      expect(room.input.calibration ?? null).toEqual(room.roomId === calibrated.id ? activeCalibration : null);
      expect(room.measured ?? null).toEqual(room.roomId === measured.id ? analysis : null);
    }
  });
});
