/** Turning settings and candidate rooms into the problem, and the plan into the report people read. */
import { describe, expect, it } from 'vitest';
import { programmeYearLabel, windowLabel } from '~/lib/engine/programme/calendar';
import { defaultProgrammeSettings } from '~/lib/engine/programme/defaults';
import { buildProblem } from '~/lib/engine/programme/model';
import { buildReport } from '~/lib/engine/programme/report';
import { planProgramme } from '~/lib/engine/programme/plan';
import type { ProgrammeCandidate, ProgrammeSettings } from '~/lib/engine/programme/types';

const room = (n: number, school: string, over: Partial<ProgrammeCandidate> = {}): ProgrammeCandidate => ({
  roomId: `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`,
  roomCode: `R${n}`,
  roomName: `Room ${n}`,
  schoolId: school,
  schoolName: `School ${school}`,
  blockId: `block-${school}`,
  blockName: 'Main',
  units: 2,
  unitsLabel: '2 × Wall unit',
  installedCostGbp: 13_000,
  pupils: 30,
  pupilHoursRemovedPerYear: 1000 + n * 10,
  rankScore: 0.5,
  rank: n,
  riskBand: 3,
  annualSavingGbp: 100,
  annualMaintenanceGbp: 120,
  annualSavingKgCo2e: 400,
  lifeYears: 15,
  predictedMeanCo2Ppm: 1600,
  predictedPeakCo2Ppm: 2600,
  measuredMeanCo2Ppm: null,
  riskReason: 'Invented reason',
  ...over,
});

const settings = (over: Partial<ProgrammeSettings> = {}): ProgrammeSettings => ({
  ...defaultProgrammeSettings(new Date('2026-12-01T00:00:00Z')),
  budgetsGbp: [100_000, 100_000],
  ...over,
});

describe('programme years and windows', () => {
  it('names school years 2027/28 and financial years 2027–28', () => {
    expect(programmeYearLabel('sep_aug', 2027, 1)).toBe('2027/28');
    expect(programmeYearLabel('apr_mar', 2027, 2)).toBe('2028–29');
  });
  it('puts the October half-term of a September–August year in its first calendar year, the summer in its second', () => {
    expect(windowLabel('sep_aug', 2027, 1, 'october')).toBe('October half-term 2027');
    expect(windowLabel('sep_aug', 2027, 1, 'summer')).toBe('Summer holiday 2028');
    expect(windowLabel('apr_mar', 2027, 1, 'summer')).toBe('Summer holiday 2027');
    expect(windowLabel('apr_mar', 2027, 1, 'february')).toBe('February half-term 2028');
  });
  it('starts a new programme at the next September', () => {
    expect(defaultProgrammeSettings(new Date('2026-12-01T00:00:00Z')).firstYear).toBe(2027);
    expect(defaultProgrammeSettings(new Date('2026-06-01T00:00:00Z')).firstYear).toBe(2026);
  });
});

describe('building the problem', () => {
  it('sets aside kept-out rooms, rooms that remove nothing and rooms too big for any window, each with its reason', () => {
    const built = buildProblem(settings({ keptOut: [room(1, 'a').roomId], unitsPerWorkingDay: 1 }), [
      room(1, 'a'),
      room(2, 'a', { pupilHoursRemovedPerYear: 0 }),
      room(3, 'a', { units: 40 }),
      room(4, 'a'),
    ]);
    expect(built.excluded.map((e) => e.reason)).toEqual(['kept_out', 'no_benefit', 'too_many_units']);
    expect(built.problem.items.map((i) => i.roomId)).toEqual([room(4, 'a').roomId]);
  });

  it('sizes each window as working days × units a day (summer 25 days × 4 = 100 units)', () => {
    const { problem } = buildProblem(settings(), [room(1, 'a')]);
    expect(problem.slots.find((s) => s.windowId === 'summer')?.capacityUnits).toBe(100);
    expect(problem.slots.find((s) => s.windowId === 'october')?.capacityUnits).toBe(20);
  });

  it('sends a room whose block joins a heating replacement to that year’s summer, with no visit of its own', () => {
    const { problem } = buildProblem(settings({ heatingJoins: [{ blockId: 'block-a', year: 2 }] }), [room(1, 'a')]);
    const item = problem.items[0]!;
    expect(item.mobilisationWaived).toBe(true);
    expect(item.allowedSlots.map((k) => `${problem.slots[k]!.year}:${problem.slots[k]!.windowId}`)).toEqual([
      '2:summer',
    ]);
  });

  it('refuses a room that is both forced in and kept out', () => {
    const id = room(1, 'a').roomId;
    expect(() => buildProblem(settings({ forcedIn: [id], keptOut: [id] }), [room(1, 'a')])).toThrow(
      /both forced in and kept out/,
    );
  });
});

describe('the report', () => {
  const candidates = [room(1, 'a'), room(2, 'a'), room(3, 'b'), room(4, 'b'), room(5, 'c'), room(6, 'c')];
  const s = settings({ budgetsGbp: [60_000, 40_000] });
  const built = buildProblem(s, candidates);
  const { assignment, info } = planProgramme(built.problem, { solver: null });
  const report = buildReport({ settings: s, built, assignment, solve: info });

  it('adds up the rooms in the plan, and the capital never exceeds a year’s budget', () => {
    const rooms = report.years.flatMap((y) => y.windows.flatMap((w) => w.schools.flatMap((v) => v.rooms)));
    expect(report.totals.rooms).toBe(rooms.length);
    expect(report.totals.pupils).toBe(rooms.length * 30);
    for (const y of report.years) expect(y.totals.capitalGbp).toBeLessThanOrEqual(y.budgetGbp + 1e-6);
  });

  it('says why each room left out is out', () => {
    const placed = [...assignment].filter((k) => k >= 0).length;
    expect(report.misses).toHaveLength(candidates.length - placed);
    for (const m of report.misses) expect(m.words.length).toBeGreaterThan(10);
  });

  it('shows a school-limited member only their school, with totals for it alone', () => {
    const limited = buildReport({ settings: s, built, assignment, solve: info, visibleSchoolIds: ['b'] });
    const schools = new Set(limited.years.flatMap((y) => y.windows.flatMap((w) => w.schools.map((v) => v.schoolId))));
    expect([...schools].every((id) => id === 'b')).toBe(true);
    expect(limited.misses.every((m) => m.schoolId === 'b')).toBe(true);
    expect(limited.partial).toBe(true);
    expect(limited.totals.rooms).toBeLessThanOrEqual(2);
  });

  it('counts the last £100k from the rooms of least benefit per pound, up to at least £100k', () => {
    const chosen = report.lastTranche.rooms.map((r) => r.pupilHoursRemovedPerYear);
    const all = report.years.flatMap((y) => y.windows.flatMap((w) => w.schools.flatMap((v) => v.rooms)));
    // Same price for every room here, so least benefit per pound = least benefit.
    const weakest = [...all].sort((a, b) => a.pupilHoursRemovedPerYear - b.pupilHoursRemovedPerYear);
    expect(chosen.sort((a, b) => a - b)).toEqual(
      weakest.slice(0, chosen.length).map((r) => r.pupilHoursRemovedPerYear),
    );
    expect(report.lastTranche.capitalGbp).toBeGreaterThanOrEqual(
      Math.min(100_000, report.totals.capitalGbp - report.totals.mobilisationGbp) - 1e-6,
    );
  });
});
