import { describe, expect, it } from 'vitest';
import { readRegisterFile } from '~/lib/server/register/parse';
import { type EstateSnapshot, planImport, type SchoolChoices } from '~/lib/server/register/plan';
import { groupRepeatedWarnings } from '~/lib/server/register/problems';
import type { ImportProblem } from '~/lib/server/register/rows';
import { TRUST_SURVEY_EXPECTED as EXPECTED, trustSurvey } from './fixtures';
import { plannerFor } from './plan-helper';

const estate: EstateSnapshot = {
  schools: [],
  blocks: [],
  rooms: [],
  defaultClimateRegion: 'south_west',
  defaultPhase: 'secondary',
};

async function plan(schoolChoices?: SchoolChoices) {
  const file = await readRegisterFile(await trustSurvey(), 'xlsx', new Map());
  return { file, plan: planImport(file.read, file.header.columns, estate, { schoolChoices }) };
}

describe('a new trust’s survey sheet: title rows, three unknown schools, bad rows, notes below', () => {
  it('finds the sheet by its own name and the header under the titles', async () => {
    const { file } = await plan();
    expect(file.sheetName).toBe(EXPECTED.sheetName);
    expect(file.header.row).toBe(EXPECTED.headerRow);
  });

  it('imports every valid row and rejects the bad ones at their own row and column', async () => {
    const { plan: p } = await plan();
    expect(p.roomWrites.map((w) => w.rowNumber)).toEqual(EXPECTED.acceptedRows);
    const errors = p.problems.filter((x) => x.severity === 'error');
    expect(Object.fromEntries(errors.map((e) => [e.row, e.column]))).toEqual(EXPECTED.rejected);
    expect(p.summary.rowsRejected).toBe(Object.keys(EXPECTED.rejected).length);
  });

  it('lists each new school once, its phase from its name and its region from its postcode where they say', async () => {
    const { plan: p } = await plan();
    expect(p.newSchools.map((s) => s.name).sort()).toEqual(Object.keys(EXPECTED.newSchools).sort());
    for (const s of p.newSchools) expect(s).toMatchObject(EXPECTED.newSchools[s.name] ?? {});
    const oakfield = p.newSchools.find((s) => s.name === 'Oakfield Academy');
    // Neither name nor sheet says: the trust's usual phase and region, said once.
    expect(oakfield).toMatchObject({ phase: 'secondary', climateRegion: 'south_west', rowCount: 3, firstRow: 11 });
    const aboutOakfield = p.problems.filter((x) => x.message.includes('Oakfield Academy') && x.severity === 'warning');
    expect(aboutOakfield).toHaveLength(1);
    expect(p.problems.filter((x) => /phase/i.test(x.message) && x.severity === 'error')).toEqual([]);
  });

  it('takes the phase and region chosen in the preview for a school', async () => {
    const { plan: p } = await plan({ 'oakfield academy': { phase: 'primary', climateRegion: 'north_west' } });
    expect(p.newSchools.find((s) => s.name === 'Oakfield Academy')).toMatchObject({
      phase: 'primary',
      phaseSource: 'chosen',
      climateRegion: 'north_west',
      regionSource: 'chosen',
    });
    expect(p.problems.filter((x) => x.message.includes('Oakfield Academy') && x.severity === 'warning')).toEqual([]);
  });

  it('says a blank ventilation type once for all the rows it applies to', async () => {
    const { plan: p } = await plan();
    const ventilation = p.problems.filter((x) => x.column === 'Ventilation');
    expect(ventilation).toHaveLength(1);
    expect(ventilation[0]?.rows).toEqual(EXPECTED.ventilationBlankRows);
    expect(ventilation[0]?.message).toMatch(/^Ventilation type blank in 5 rows/);
  });

  it('skips the notes under the data and says which rows they were', async () => {
    const { file, plan: p } = await plan();
    expect(file.read.notes?.map((n) => n.rowNumber)).toEqual(EXPECTED.noteRows);
    expect(p.problems.find((x) => x.message.startsWith('Not a room'))?.rows).toEqual(EXPECTED.noteRows);
  });

  it('keeps each rejected row as the file held it, with what to fix', async () => {
    const { plan: p } = await plan();
    expect(p.rejectedRows.map((r) => r.row)).toEqual(Object.keys(EXPECTED.rejected).map(Number));
    const bigArea = p.rejectedRows.find((r) => r.row === 6);
    expect(bigArea?.cells.slice(0, 7)).toEqual([
      'Hartley High School',
      'LS6 2AB',
      'Main',
      'H03',
      'Science',
      'Science lab',
      'big',
    ]);
    expect(bigArea?.fixes).toEqual(['Floor area (m2): "big" is not a number.']);
  });
});

describe('rows that are not rooms', () => {
  const plan = plannerFor(['school', 'code', 'floorAreaM2'], { ...estate, defaultPhase: 'primary' });
  it('keeps a lone room code as a room to report, but skips nothing it cannot read as one', () => {
    const p = plan([[null, 'G12', null]]);
    expect(p.summary.rowsRejected).toBe(1);
    expect(p.problems.some((x) => x.row === 2 && x.severity === 'error')).toBe(true);
  });
});

describe('grouping repeated warnings', () => {
  const warning = (row: number, message: string, column = 'Use'): ImportProblem => ({
    row,
    column,
    columnLetter: 'C',
    value: '',
    severity: 'warning',
    message,
  });
  it('groups the same warning on the same column, keeps errors one per row, and leaves single warnings as they are', () => {
    const error: ImportProblem = { ...warning(3, 'Room use: "x" is not a room use.'), severity: 'error' };
    const grouped = groupRepeatedWarnings([
      warning(2, 'Room use blank: stored as unknown.'),
      error,
      warning(4, 'Room use blank: stored as unknown.'),
      warning(5, 'Room use blank: stored as unknown.', 'Pupils'),
      error,
    ]);
    expect(grouped).toEqual([
      { ...warning(2, 'Room use blank in 2 rows: stored as unknown.'), rows: [2, 4] },
      error,
      warning(5, 'Room use blank: stored as unknown.', 'Pupils'),
      error,
    ]);
  });
});
