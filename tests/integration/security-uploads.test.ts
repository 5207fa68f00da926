// Hostile uploads (issue 17, item 3), built here on purpose, against the running app: zips whose parts
// disagree with their table of contents, zip bombs, merged-cell floods, XML entities, impossible row
// numbers, NUL bytes, temporary files, and bodies far over the limit.
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, utimesSync } from 'node:fs';
import http from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { deflateRawSync } from 'node:zlib';
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serverEnv, spawnBuiltServer } from '../helpers/built-server';
import { testDb } from '../helpers/db';
import { waitFor } from '../helpers/wait';
import { APP_URL, api, createOtherTrust } from '../helpers/session';
import { readZip, withLocalSizeMismatch, writeZip, type ZipPart } from '../helpers/zip';
import { roomRow, tidyRegister, toBuffer } from '../unit/register/fixtures';

const db = testDb();
let cookie = '';
let trustId = '';
beforeAll(async () => {
  ({ cookie, trustId } = await createOtherTrust());
});
afterAll(() => db.destroy());

type Answer = { status: number; body: { error?: { code: string; message: string }; id?: string } };

async function upload(name: string, bytes: Buffer): Promise<Answer> {
  const form = new FormData();
  form.append('file', new Blob([new Uint8Array(bytes)]), name);
  const response = await api('/api/imports', { method: 'POST', cookie, body: form });
  return { status: response.status, body: (await response.json()) as Answer['body'] };
}

/** The import history is unchanged by a refused upload: nothing is stored. */
const importCount = async () =>
  Number(
    (
      await db
        .selectFrom('register_imports')
        .select((eb) => eb.fn.countAll<number>().as('n'))
        .where('trust_id', '=', trustId)
        .executeTakeFirstOrThrow()
    ).n,
  );

async function refused(name: string, bytes: Buffer, message: RegExp): Promise<void> {
  const before = await importCount();
  const { status, body } = await upload(name, bytes);
  expect(status, JSON.stringify(body)).toBe(400);
  expect(body.error?.message).toMatch(message);
  expect(await importCount()).toBe(before);
}

/** A valid two-room register, taken apart into its zip parts. */
async function registerParts(): Promise<ZipPart[]> {
  return readZip(await tidyRegister([roomRow('Oak Primary', 'R1'), roomRow('Oak Primary', 'R2')]));
}

function editPart(parts: ZipPart[], name: string, edit: (xml: string) => string): ZipPart[] {
  return parts.map((p) => (p.name === name ? { name, data: Buffer.from(edit(p.data.toString('utf8'))) } : p));
}

const SHEET = 'xl/worksheets/sheet1.xml';
const STRINGS = 'xl/sharedStrings.xml';

describe('zip structure', () => {
  it('accepts the untouched register (the fixtures themselves are sound)', async () => {
    const { status } = await upload('register.xlsx', writeZip(await registerParts()));
    expect(status).toBe(201);
  });

  it('refuses a part hidden from the table of contents (a streaming reader would read it unchecked)', async () => {
    const parts = await registerParts();
    // A second, huge shared-strings part that only a reader of the local headers meets.
    const flood = Buffer.from(`<sst>${'<si><t>xxxxxxxxxxxxxxxxxxxxxxxxxxxxxx</t></si>'.repeat(1_000_000)}</sst>`);
    const sharedLast = [...parts.filter((p) => p.name !== STRINGS)];
    const zip = writeZip(sharedLast, [{ name: STRINGS, data: flood }]);
    await refused('hidden.xlsx', zip, /table of contents does not list/);
  });

  it('refuses a part whose local header disagrees with the table of contents', async () => {
    const zip = withLocalSizeMismatch(writeZip(await registerParts()), SHEET);
    await refused('mismatch.xlsx', zip, /described differently in two places/);
  });

  it('refuses parts that together unpack past the limit, counting what really unpacks, not what they claim', async () => {
    const parts = await registerParts();
    const spaces = deflateRawSync(Buffer.alloc(150 * 1024 * 1024, 0x20));
    const bombs = [2, 3, 4].map((n) => ({
      name: `xl/media/padding${n}.xml`,
      data: Buffer.alloc(0),
      deflated: spaces,
      declaredSize: 1000,
    }));
    await refused('bomb.xlsx', writeZip([...parts, ...bombs]), /unpacks to more than 384 MB/);
  }, 60_000);
});

describe('sheet contents', () => {
  it('refuses 20,000 merged ranges at once, and the server keeps answering meanwhile', async () => {
    const merges = Array.from({ length: 20_000 }, (_, i) => `<mergeCell ref="A${i + 3}:T${i + 5003}"/>`).join('');
    const parts = editPart(await registerParts(), SHEET, (xml) =>
      xml.replace('</sheetData>', `</sheetData><mergeCells count="20000">${merges}</mergeCells>`),
    );
    const started = performance.now();
    const [answer, health] = await Promise.all([
      upload('merged.xlsx', writeZip(parts)),
      (async () => {
        await new Promise((r) => setTimeout(r, 50));
        return api('/api/health');
      })(),
    ]);
    expect(health.status).toBe(200);
    expect(answer.status).toBe(400);
    expect(answer.body.error?.message).toMatch(/merged cells/);
    // Refused on the count alone, not after filling 20,000 × 5,000 rows of cells.
    expect(performance.now() - started).toBeLessThan(10_000);
  });

  it.each([
    ['an internal entity declaration', '<!DOCTYPE sst [<!ENTITY big "xxxxxxxxxxxxxxxx">]>'],
    ['an external entity', '<!DOCTYPE sst [<!ENTITY ext SYSTEM "file:///etc/passwd">]>'],
    ['a document type alone', '<!DOCTYPE sst>'],
  ])('refuses shared strings with %s', async (_label, doctype) => {
    const parts = editPart(await registerParts(), STRINGS, (xml) =>
      xml.replace('?>', `?>${doctype}`).replace('<t>Oak Primary</t>', '<t>&big;&ext;</t>'),
    );
    await refused('entity.xlsx', writeZip(parts), /entities or a document type/);
  });

  /** The sheet with the first room's name (cell F2) written inline as `text`. */
  const roomNameInline = async (text: string) =>
    editPart(await registerParts(), SHEET, (xml) =>
      xml.replace(/<c r="F2" t="s"><v>\d+<\/v><\/c>/, `<c r="F2" t="inlineStr"><is><t>${text}</t></is></c>`),
    );

  it('reads a room name written inline in the sheet (so the two tests below test what they say)', async () => {
    const { status } = await upload('inline.xlsx', writeZip(await roomNameInline('Room inline')));
    expect(status).toBe(201);
  });

  it('refuses an undefined entity in a sheet with a 400, not a 500', async () => {
    const parts = await roomNameInline('&undefinedthing;');
    await refused('undefined-entity.xlsx', writeZip(parts), /could not read this workbook/);
  });

  it.each([
    ['zero', '0'],
    ['negative', '-5'],
    ['past the last sheet row', '99999999999'],
    ['not a number', 'abc'],
    ['before the row above it', '1'],
  ])('refuses a row number that is %s', async (_label, bad) => {
    const parts = editPart(await registerParts(), SHEET, (xml) => xml.replace('<row r="3"', `<row r="${bad}"`));
    await refused('rows.xlsx', writeZip(parts), /row numbers|could not read/);
  });

  it('refuses NUL bytes in a workbook cell', async () => {
    const parts = await roomNameInline('Room&#0;1');
    await refused('nul.xlsx', writeZip(parts), /NUL|could not read/);
  });

  it('refuses NUL bytes in a CSV cell at the preview, so no commit can fail on them', async () => {
    const lines = ['School,School phase,Room code,Floor area (m2),Ceiling height (m),Pupils'];
    for (let i = 0; i < 30; i++) lines.push(`Oak Primary,Primary,R${i},50,2.7,30`);
    lines.push('Oak Primary,Primary,R\u0000NUL,50,2.7,30');
    await refused('nul.csv', Buffer.from(lines.join('\n')), /Row 32 contains a NUL character/);
  });
});

describe('reading off the request thread', () => {
  it('keeps answering other requests while a 20 MB register is read and checked', async () => {
    const lines = [
      'School,School phase,Block,Room code,Room name,Room use,Floor area (m2),Ceiling height (m),Pupils,Adults,Notes',
    ];
    for (let i = 0; i < 190_000; i++)
      lines.push(`School ${i % 40},Primary,Main,R${i},Room ${i},Classroom,55,2.7,30,2,Surveyed room ${i} in 2026`);
    const bytes = Buffer.from(lines.join('\n'));
    expect(bytes.length).toBeLessThan(20 * 1024 * 1024);
    let uploading = true;
    let longestWaitMs = 0;
    const probe = (async () => {
      while (uploading) {
        const start = performance.now();
        expect((await api('/api/health')).status).toBe(200);
        longestWaitMs = Math.max(longestWaitMs, performance.now() - start);
      }
    })();
    const started = performance.now();
    const { status } = await upload('big.csv', bytes);
    const uploadMs = performance.now() - started;
    uploading = false;
    await probe;
    expect(status).toBe(201);
    // Reading this file takes seconds of CPU; done in the request thread it held every other request
    // for most of that time.
    expect(uploadMs).toBeGreaterThan(1000);
    expect(longestWaitMs).toBeLessThan(750);
  }, 120_000);
});

describe('temporary files', () => {
  it('leaves no temporary files behind after a preview', async () => {
    // exceljs writes sheets before the shared strings, so its reader parks them in temporary files;
    // with two sheets the reader stops after the first, which is where files used to be left behind.
    const wb = new ExcelJS.Workbook();
    const rooms = wb.addWorksheet('Rooms');
    rooms.addRow(Object.keys(roomRow('Oak Primary', 'R1')));
    for (let i = 0; i < 500; i++) rooms.addRow(Object.values(roomRow('Oak Primary', `T${i}`)) as ExcelJS.CellValue[]);
    wb.addWorksheet('Notes').addRow(['Surveyed in 2026 by the estates team']);
    const appPid = readFileSync(process.env.APP_PID_FILE ?? '', 'utf8').trim();
    const leftovers = () =>
      readdirSync(tmpdir()).filter((f) => f.startsWith(`tmp-${appPid}-`) || f.startsWith('airtally-import-'));
    const before = leftovers();
    const { status } = await upload('two sheets.xlsx', await toBuffer(wb));
    expect(status).toBe(201);
    // The answer does not wait for the reader to stop; its folder goes as soon as it has.
    const left = () => leftovers().filter((f) => !before.includes(f));
    const deadline = Date.now() + 10_000;
    while (left().length > 0) {
      if (Date.now() > deadline) throw new Error(`Temporary files left 10 s after the preview: ${left().join(', ')}`);
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
    expect(leftovers()).toEqual(before);
  });

  it('removes the folder of the spare reader’s warm-up once the warm-up has ended', async () => {
    // After each preview a spare reader warms up on a register of our own, with a temporary folder of its own. (Folders
    // there before are left out: a server stopped during a warm-up cannot remove its folder.)
    const allWarmUpFolders = () => readdirSync(tmpdir()).filter((f) => f.startsWith('airtally-warm-up-'));
    const before = new Set(allWarmUpFolders());
    const warmUpFolders = () => allWarmUpFolders().filter((f) => !before.has(f));
    const { status } = await upload('one room.xlsx', await tidyRegister([roomRow('Oak Primary', 'W1')]));
    expect(status).toBe(201);
    const deadline = Date.now() + 60_000;
    while (warmUpFolders().length > 0) {
      if (Date.now() > deadline) throw new Error(`Warm-up folders left after a minute: ${warmUpFolders().join(', ')}`);
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
  }, 90_000);

  /** Folders as a stopped server leaves them: two stale (hours old), one recent and one of another program. */
  const leftFolders = (tag: string) => {
    const made = (name: string, ageMs: number) => {
      const path = join(tmpdir(), name);
      mkdirSync(join(path, 'inside'), { recursive: true });
      const when = new Date(Date.now() - ageMs);
      utimesSync(path, when, when);
      return path;
    };
    const hour = 3600 * 1000;
    const id = `${tag}-${process.pid}`;
    return {
      staleUpload: made(`airtally-import-test-stale-${id}`, 2 * hour),
      staleWarmUp: made(`airtally-warm-up-test-stale-${id}`, 3 * hour),
      recent: made(`airtally-import-test-recent-${id}`, hour / 2),
      unrelated: made(`someone-else-test-${id}`, 5 * hour),
    };
  };

  it('sweeps the folders a stopped server left more than an hour ago, and only those', async () => {
    const { staleUpload, staleWarmUp, recent, unrelated } = leftFolders('preview');
    try {
      const { status } = await upload('one room.xlsx', await tidyRegister([roomRow('Oak Primary', 'S1')]));
      expect(status).toBe(201);
      const deadline = Date.now() + 30_000;
      while (existsSync(staleUpload) || existsSync(staleWarmUp)) {
        if (Date.now() > deadline) throw new Error('Stale folders still there 30 s after a preview');
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
      expect(existsSync(recent)).toBe(true);
      expect(existsSync(unrelated)).toBe(true);
    } finally {
      for (const path of [staleUpload, staleWarmUp, recent, unrelated]) rmSync(path, { recursive: true, force: true });
    }
  }, 60_000);

  it('sweeps them when a server starts, before any upload', async () => {
    const { staleUpload, staleWarmUp, recent, unrelated } = leftFolders('start');
    // A second server on a port of its own, taking no assessment jobs from the test stack's app.
    const server = spawnBuiltServer(serverEnv(91, { ASSESSMENT_APP_WORKERS: '0' }));
    try {
      await waitFor(
        'the new server has removed the stale folders',
        () => !existsSync(staleUpload) && !existsSync(staleWarmUp),
        { timeoutMs: 30_000 },
      ).catch((error: unknown) => {
        throw new Error(`${(error as Error).message}; server output:\n${server.output()}`);
      });
      expect(existsSync(recent)).toBe(true);
      expect(existsSync(unrelated)).toBe(true);
    } finally {
      await server.stop();
      for (const path of [staleUpload, staleWarmUp, recent, unrelated]) rmSync(path, { recursive: true, force: true });
    }
  }, 60_000);
});

/**
 * Sends `totalBytes` to `path` as fast as the server takes them, with or without declaring the size, and
 * goes on sending after an answer for as long as the server reads; reports the status (if an answer came)
 * and how many bytes the server had taken when it closed the connection (or all of them).
 */
function flood(
  path: string,
  totalBytes: number,
  { declare, contentType }: { declare: boolean; contentType: string },
): Promise<{ status: number | null; sentBytes: number }> {
  const url = new URL(path, APP_URL);
  return new Promise((resolve, reject) => {
    const chunk = Buffer.alloc(1024 * 1024, 0x61);
    let sent = 0;
    let done = false;
    let status: number | null = null;
    const finish = () => {
      if (done) return;
      done = true;
      clearTimeout(timer);
      request.destroy();
      resolve({ status, sentBytes: sent });
    };
    const timer = setTimeout(() => {
      done = true;
      request.destroy();
      reject(new Error(`No answer after sending ${sent} bytes`));
    }, 60_000);
    const request = http.request(url, {
      method: 'POST',
      headers: {
        cookie,
        origin: APP_URL,
        'content-type': contentType,
        ...(declare ? { 'content-length': String(totalBytes) } : {}),
      },
    });
    request.on('response', (response) => {
      status = response.statusCode ?? null;
      response.resume();
    });
    request.on('error', finish);
    request.on('close', finish);
    const pump = (): void => {
      while (!done && sent < totalBytes) {
        sent += chunk.length;
        if (!request.write(chunk)) {
          request.once('drain', pump);
          return;
        }
      }
      if (!done) request.end(finish);
    };
    pump();
  });
}

describe('request bodies', () => {
  const TOTAL = 300 * 1024 * 1024;
  it.each([
    ['an upload with its size declared', '/api/imports', true, 'multipart/form-data; boundary=x'],
    ['an upload without a declared size', '/api/imports', false, 'multipart/form-data; boundary=x'],
    ['a JSON body with its size declared', '/api/rooms', true, 'application/json'],
    ['a JSON body without a declared size', '/api/rooms', false, 'application/json'],
  ])(
    'refuses 300 MB in %s without reading it all',
    async (_label, path, declare, contentType) => {
      const { status, sentBytes } = await flood(path, TOTAL, { declare, contentType });
      // Either the 413 arrived, or the server closed the connection on the rest; it never read it all.
      if (status !== null) expect(status).toBe(413);
      expect(sentBytes).toBeLessThan(100 * 1024 * 1024);
    },
    90_000,
  );

  it('answers 413 with the limit to an upload a little over it', async () => {
    const { status, body } = await upload('big.csv', Buffer.alloc(21 * 1024 * 1024, 0x41));
    expect(status).toBe(413);
    expect(body.error?.message).toMatch(/limit is 20 MB/);
  });
});
