import { describe, expect, it } from 'vitest';
import { assumedWords } from '~/lib/engine/assess';
import {
  assessRoom,
  completeAssumptionSet,
  DEFAULT_ASSUMPTIONS,
  EngineInputError,
  listAssumptions,
  validateAssumptionSet,
  withAssumptionValue,
} from '~/lib/engine/index';
import { typicalClassroom } from './helpers';

const STATUSES = ['confirmed', 'secondary', 'from_memory', 'common_practice'];

describe('the default assumption set', () => {
  const entries = listAssumptions(DEFAULT_ASSUMPTIONS);

  it('gives every value a source, a status tag, a kind, a label and a unit', () => {
    expect(entries.length).toBeGreaterThan(40);
    for (const e of entries) {
      expect(e.source.length, e.path).toBeGreaterThan(5);
      expect(STATUSES, e.path).toContain(e.status);
      expect(['technical', 'financial'], e.path).toContain(e.kind);
      expect(e.label.length, e.path).toBeGreaterThan(2);
      expect(e.unit.length, e.path).toBeGreaterThan(0);
    }
  });

  it('uses the current outdoor CO2 (NOAA GML Mauna Loa annual mean 2024 ≈ 424.6 ppm, from memory), the newest DESNZ electricity factor (2025 ≈ 0.177, secondary) and 3.5 % (Green Book, confirmed)', () => {
    const get = (path: string) => entries.find((e) => e.path === path);
    expect(get('air.outdoorCo2Ppm')?.value).toBe(425);
    expect(get('finance.electricityKgCo2ePerKwh')?.value).toBe(0.177);
    expect(get('windows.frameFactorByMaterial')?.value).toMatchObject({ timber: 0.7, pvc_u: 0.7, metal: 0.8 });
    expect(get('finance.discountRate')).toMatchObject({ value: 0.035, status: 'confirmed', kind: 'financial' });
    expect(get('finance.electricityPriceGbpPerKwh')?.kind).toBe('financial');
    expect(get('windows.dischargeCoefficient')?.kind).toBe('technical');
  });

  it('has a timetable like worked example 1, 09:00 to 15:15', () => {
    const tt = DEFAULT_ASSUMPTIONS.occupancy.timetable.value;
    expect(tt[0]?.startMinute).toBe(540);
    expect(tt[tt.length - 1]?.endMinute).toBe(915);
  });

  it('ships three to four generic unit models named by us', () => {
    const models = DEFAULT_ASSUMPTIONS.retrofit.unitCatalogue.value;
    expect(models.length).toBeGreaterThanOrEqual(3);
    expect(models.length).toBeLessThanOrEqual(4);
  });

  it('passes its own validation', () => {
    expect(() => validateAssumptionSet(DEFAULT_ASSUMPTIONS)).not.toThrow();
  });
});

describe('editing an assumption set', () => {
  it('replaces one value, sets the new version and notes the edit, leaving the default untouched', () => {
    const edited = withAssumptionValue(DEFAULT_ASSUMPTIONS, 'finance.discountRate', 0.03, 'trust-7-v2');
    expect(edited.finance.discountRate.value).toBe(0.03);
    expect(edited.finance.discountRate.note).toMatch(/^Edited/);
    expect(edited.version).toBe('trust-7-v2');
    expect(DEFAULT_ASSUMPTIONS.finance.discountRate.value).toBe(0.035);
  });

  it('rejects an unknown path, naming it', () => {
    expect(() => withAssumptionValue(DEFAULT_ASSUMPTIONS, 'finance.nope', 1, 'x')).toThrow(EngineInputError);
  });

  it('rejects an out-of-range value on validation, naming the path', () => {
    const bad = withAssumptionValue(DEFAULT_ASSUMPTIONS, 'finance.discountRate', 0.5, 'x');
    try {
      validateAssumptionSet(bad);
      expect.unreachable();
    } catch (e) {
      expect((e as EngineInputError).field).toBe('assumptions.finance.discountRate');
    }
  });

  it('rejects a timetable with a gap', () => {
    const bad = structuredClone(DEFAULT_ASSUMPTIONS);
    const second = bad.occupancy.timetable.value[1];
    if (second) second.startMinute = 605;
    expect(() => validateAssumptionSet(bad)).toThrow(/previous period ends/);
  });
});

describe('sets stored by an earlier engine version', () => {
  it('are completed from the defaults, and the result says which assumptions were filled', () => {
    const old = structuredClone(DEFAULT_ASSUMPTIONS) as unknown as {
      comfort: Record<string, unknown>;
      version: string;
    };
    delete old.comfort.deskDistanceFromWindowM;
    old.version = 'stored-2026-11';
    const { set, filled } = completeAssumptionSet(old as unknown as typeof DEFAULT_ASSUMPTIONS, DEFAULT_ASSUMPTIONS);
    expect(filled).toEqual(['comfort.deskDistanceFromWindowM']);
    expect(set.comfort.deskDistanceFromWindowM.value).toBe(DEFAULT_ASSUMPTIONS.comfort.deskDistanceFromWindowM.value);
    const a = assessRoom(typicalClassroom(), old as unknown as typeof DEFAULT_ASSUMPTIONS);
    expect(a.assumptionsVersion).toBe('stored-2026-11');
    expect(assumedWords(a)[0]).toMatch(/^assumptions\.comfort\.deskDistanceFromWindowM → Airtally default/);
  });

  it('keep their own values', () => {
    const edited = withAssumptionValue(DEFAULT_ASSUMPTIONS, 'air.outdoorCo2Ppm', 450, 'v2');
    const { set, filled } = completeAssumptionSet(edited, DEFAULT_ASSUMPTIONS);
    expect(filled).toEqual([]);
    expect(set.air.outdoorCo2Ppm.value).toBe(450);
  });
});

describe('the one declaration of assumption ranges', () => {
  it('declares a range for every number of the default set, and the defaults sit inside them', async () => {
    const { assumptionLeaves } = await import('../../../src/lib/engine/assumption-tools');
    const { assumptionLimit } = await import('../../../src/lib/engine/assumption-limits');
    const numbers = assumptionLeaves(DEFAULT_ASSUMPTIONS).filter(([, v]) => typeof v === 'number');
    expect(numbers.length).toBeGreaterThan(100);
    for (const [path, value] of numbers) {
      const limit = assumptionLimit(path);
      expect(limit, path).not.toBeNull();
      expect(value as number, path).toBeGreaterThanOrEqual(limit!.min);
      expect(value as number, path).toBeLessThanOrEqual(limit!.max);
    }
  });

  it('reads and writes values in the unit people type: 3.5 % is 0.035, 24.55 p/kWh is £0.2455, 09:15 is minute 555', async () => {
    const { fromDisplay, toDisplay, checkTyped, assumptionLimit, displayUnit } = await import(
      '../../../src/lib/engine/assumption-limits'
    );
    expect(fromDisplay('3.5', 'percent')).toBe(0.035);
    expect(fromDisplay('3.5 %', 'percent')).toBe(0.035);
    expect(fromDisplay('24.55', 'pence')).toBe(0.2455);
    expect(fromDisplay('09:15', 'clock')).toBe(555);
    expect(fromDisplay('Sep', 'months')).toBe(9);
    expect(fromDisplay('abc', 'percent')).toBeNull();
    expect(toDisplay(0.035, 'percent')).toBe('3.5');
    expect(toDisplay(0.07, 'pence')).toBe('7');
    expect(toDisplay(540, 'clock')).toBe('09:00');
    // The Green Book rate is allowed; 25 % is outside the declared 0–20 % and says so in the unit typed.
    const rate = assumptionLimit('finance.discountRate')!;
    expect(checkTyped('3.5', rate, '-')).toBeNull();
    expect(checkTyped('25', rate, '-')).toBe('Must be between 0 and 20 %.');
    // A cell of a table says its own unit; a cell of a list by month says the unit alone.
    const roomTemp = assumptionLimit('seasons.winter.indoorTempC')!;
    expect(checkTyped('35', roomTemp, 'table')).toBe('Must be between 10 and 30 °C.');
    expect(displayUnit(roomTemp.display, 'table', roomTemp.unit)).toBe('°C');
    expect(displayUnit(undefined, 'K by month')).toBe('K');
  });

  it('refuses a value outside its declared range through the engine check, naming the path', () => {
    const bad = withAssumptionValue(
      DEFAULT_ASSUMPTIONS,
      'finance.fuelPricesGbpPerKwh',
      { ...DEFAULT_ASSUMPTIONS.finance.fuelPricesGbpPerKwh.value, gas: 3 },
      'x',
    );
    expect(() => validateAssumptionSet(bad)).toThrow(/finance\.fuelPricesGbpPerKwh\.gas/);
  });
});
