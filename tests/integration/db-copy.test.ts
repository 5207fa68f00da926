// Binary COPY (src/lib/server/db/copy.ts) against the real PostgreSQL: what PostgreSQL reads back must be the values
// we wrote, NULLs where we wrote nothing or a number that is not finite, over more than one 256 kB piece; what we read
// by binary COPY must be what the pg driver reads of the same query as text.
import pg from 'pg';
import { describe, expect, it } from 'vitest';
import {
  type BinaryColumn,
  type BinaryValue,
  binaryCopyPieces,
  copyLines,
  type ReadValue,
  readBinaryCopy,
} from '../../src/lib/server/db/copy';

const COLUMNS: BinaryColumn[] = ['uuid', 'text', 'int2', 'int4', 'float8', 'bool'];

interface Row {
  id: string | null;
  label: string | null;
  band: number | null;
  pupils: number | null;
  ppm: number | null;
  met: boolean | null;
}
const valuesOf = (r: Row): BinaryValue[] => [r.id, r.label, r.band, r.pupils, r.ppm, r.met];

async function roundTrip(rows: Row[]): Promise<Row[]> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    await client.query(
      'CREATE TEMP TABLE copy_check (n serial, id uuid, label text, band smallint, pupils integer, ppm float8, met boolean)',
    );
    await client.query('BEGIN');
    await copyLines(
      client as unknown as pg.PoolClient,
      'COPY copy_check (id, label, band, pupils, ppm, met) FROM STDIN (FORMAT binary)',
      binaryCopyPieces(rows, COLUMNS, valuesOf),
    );
    await client.query('COMMIT');
    return (await client.query<Row>('SELECT id, label, band, pupils, ppm, met FROM copy_check ORDER BY n')).rows;
  } finally {
    await client.end();
  }
}

describe('binary COPY', () => {
  it('writes uuids, text, integers, floats and booleans as PostgreSQL reads them back', async () => {
    const rows: Row[] = [
      { id: '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4d', label: 'Room 1', band: 3, pupils: 30, ppm: 1234.5678, met: true },
      {
        id: 'FFFFFFFF-0000-4000-8000-00000000000A',
        label: 'Tab\there, new\nline, back\\slash',
        band: -2,
        pupils: -7,
        ppm: -0.1,
        met: false,
      },
      { id: null, label: 'Élève – 20 m³/h ✓', band: null, pupils: null, ppm: null, met: null },
      { id: null, label: '', band: 0, pupils: 2147483647, ppm: 1e-300, met: null },
      // Short text whose accents are all in Latin-1 (one UTF-16 unit, two UTF-8 bytes).
      { id: null, label: 'Salle de réunion', band: 4, pupils: 4, ppm: 4, met: true },
      // Text past the short-text path's 64 characters, with accents before and after that point.
      { id: null, label: `${'a'.repeat(63)}é${'ü'.repeat(100)}`, band: 1, pupils: 1, ppm: 1, met: true },
      // One row larger than a whole piece (the buffer grows to hold it).
      { id: null, label: 'Notes '.repeat(100_000), band: 2, pupils: 2, ppm: 2, met: false },
    ];
    expect(await roundTrip(rows)).toEqual([
      { ...rows[0], id: '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4d' },
      { ...rows[1], id: 'ffffffff-0000-4000-8000-00000000000a' },
      rows[2],
      rows[3],
      rows[4],
      rows[5],
      rows[6],
    ]);
  });

  it('writes NULL for a number that is not finite, as the text format did', async () => {
    const read = await roundTrip([
      { id: null, label: null, band: null, pupils: null, ppm: Number.NaN, met: null },
      { id: null, label: null, band: null, pupils: null, ppm: Number.POSITIVE_INFINITY, met: null },
    ]);
    expect(read.map((r) => r.ppm)).toEqual([null, null]);
  });

  it('keeps every row across many pieces', async () => {
    // About 600 kB of rows: the stream crosses the 256 kB piece size twice.
    const rows: Row[] = Array.from({ length: 6000 }, (_, i) => ({
      id: null,
      label: `Room ${i} ${'x'.repeat(60)}`,
      band: i % 5,
      pupils: i,
      ppm: i / 7,
      met: i % 2 === 0,
    }));
    const read = await roundTrip(rows);
    expect(read).toHaveLength(6000);
    expect(read[0]).toEqual(rows[0]);
    expect(read[4321]).toEqual(rows[4321]);
    expect(read[5999]).toEqual(rows[5999]);
  });

  it('refuses a value that is not of its column type before anything is sent', () => {
    for (const id of [
      'not-a-uuid',
      '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4', // a digit short
      '0a1b2c3d4-e5f-4a6b-8c7d-9e0f1a2b3c4d', // a dash out of place
      '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4g', // not a hex digit
      '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4\u0130', // a letter whose low bits read as "0"
    ])
      expect(() => [...binaryCopyPieces([{ id }], ['uuid'], (r) => [r.id])], id).toThrow(/not a uuid/);
    expect(() => [...binaryCopyPieces([{ n: 2.5 }], ['int4'], (r) => [r.n])]).toThrow(/not an integer/);
    expect(() => [...binaryCopyPieces([{ n: 1 }], ['int4', 'int4'], (r) => [r.n])]).toThrow(/1 values for 2 columns/);
  });
});

/** Runs `work` on a connection of its own. */
async function withClient<T>(work: (client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    return await work(client as unknown as pg.PoolClient);
  } finally {
    await client.end();
  }
}

async function readAll(client: pg.PoolClient, query: string, columns: Parameters<typeof readBinaryCopy>[2]) {
  const rows: ReadValue[][] = [];
  for await (const batch of readBinaryCopy(client, `COPY (${query}) TO STDOUT (FORMAT binary)`, columns))
    rows.push(...batch.map((row) => row.map((v) => (v instanceof Uint8Array ? Buffer.from(v).toString('hex') : v))));
  return rows;
}

describe('reading by binary COPY', () => {
  // 20,000 rows of every type, NULLs among them: several chunks of the stream, rows cut between them.
  const QUERY = `SELECT md5(n::text)::uuid, CASE WHEN n % 7 = 0 THEN NULL ELSE 'Room ' || n || ' – é ✓' END,
      (n % 5 - 2)::int2, (n * 1000)::int4, (n::int8 * 3000000000), CASE WHEN n % 11 = 0 THEN NULL ELSE n / 7.0::float8 END,
      n % 2 = 0, md5(n::text)::uuid
    FROM generate_series(1, 20000) n ORDER BY n`;

  it('reads what the pg driver reads of the same rows as text', async () => {
    const [copied, asText] = await withClient(async (client) => [
      await readAll(client, QUERY, ['uuid', 'text', 'int2', 'int4', 'int8', 'float8', 'bool', 'uuid-bytes']),
      (await client.query({ text: QUERY, rowMode: 'array' })).rows as unknown[][],
    ]);
    expect(copied).toHaveLength(20000);
    const expected = asText.map((row) => [
      row[0],
      row[1],
      row[2],
      row[3],
      Number(row[4]),
      row[5] === null ? null : Number(row[5]),
      row[6],
      String(row[7]).replaceAll('-', ''),
    ]);
    expect(copied).toEqual(expected);
  });

  it('gives uuid bytes that binary COPY writes back as the same uuid', async () => {
    const read = await withClient((client) =>
      readAll(client, "SELECT '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4d'::uuid", ['uuid-bytes']),
    );
    const bytes = Buffer.from(read[0]![0] as string, 'hex');
    const written = await withClient(async (client) => {
      await client.query('CREATE TEMP TABLE uuid_check (id uuid)');
      await copyLines(
        client,
        'COPY uuid_check (id) FROM STDIN (FORMAT binary)',
        binaryCopyPieces([bytes], ['uuid'], (b) => [b]),
      );
      return (await client.query<{ id: string }>('SELECT id::text FROM uuid_check')).rows;
    });
    expect(written).toEqual([{ id: '0a1b2c3d-4e5f-4a6b-8c7d-9e0f1a2b3c4d' }]);
  });

  it('refuses a column whose type is not the one named', async () => {
    await expect(withClient((client) => readAll(client, 'SELECT 1::int4', ['float8']))).rejects.toThrow(
      /column 1 has 4 bytes, not 8/,
    );
    await expect(withClient((client) => readAll(client, 'SELECT 1::int4, 2::int4', ['int4']))).rejects.toThrow(
      /2 fields for 1 columns/,
    );
  });
});
