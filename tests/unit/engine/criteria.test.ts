import { describe, expect, it } from 'vitest';
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import { CRITERIA_PACKS, applyPack, buildStatusOf, choosePack, en16798DesignAirflowLps } from '~/lib/engine/criteria';

const pack = (id: string) => {
  const p = CRITERIA_PACKS.find((x) => x.id === id);
  if (!p) throw new Error(id);
  return p;
};

describe('EN 16798-1:2019 Annex B', () => {
  it('design airflow for 31 persons, 56 m², Category II, low-polluting is 256.2 L/s (EN 16798-1:2019 Annex B, by hand)', () => {
    expect(
      Math.abs(
        en16798DesignAirflowLps({ persons: 31, floorAreaM2: 56, category: 'II', building: 'low_polluting' }) - 256.2,
      ),
    ).toBeLessThanOrEqual(0.01);
  });

  it('Category II limit with outdoor 420 ppm is 1220 ppm (EN 16798-1:2019 Annex B)', () => {
    expect(applyPack(pack('en16798_cat_II'), 420).meanLimitPpm).toBe(1220);
  });

  it('Categories I and III with outdoor 420 ppm are 970 and 1770 ppm (EN 16798-1:2019 Annex B)', () => {
    expect(applyPack(pack('en16798_cat_I'), 420).meanLimitPpm).toBe(970);
    expect(applyPack(pack('en16798_cat_III'), 420).meanLimitPpm).toBe(1770);
  });
});

describe('BB101 (2018) packs', () => {
  it('carry the daily-mean and 20-minute maximum figures of BB101 (2018)', () => {
    // ESFA (2018) Building Bulletin 101, CO2 criteria by ventilation and new build or refurbishment (secondary: CIBSE
    // Journal and consultancy summaries, see docs/sources.md): new natural 1500 / 2000; new mechanical 1000 / 1500; refurb natural 1750 / 2000; refurb mechanical 1350 / 2000.
    const expected: [string, number, number][] = [
      ['bb101_2018_new_natural', 1500, 2000],
      ['bb101_2018_new_mechanical', 1000, 1500],
      ['bb101_2018_refurb_natural', 1750, 2000],
      ['bb101_2018_refurb_mechanical', 1350, 2000],
    ];
    for (const [id, mean, max] of expected) {
      const applied = applyPack(pack(id), 420);
      expect(applied.meanLimitPpm).toBe(mean);
      expect(applied.maxLimitPpm).toBe(max);
      expect(applied.maxMinutesCap).toBe(20);
    }
  });

  it('flags the disputed 20-minute cap as an editable assumption', () => {
    expect(pack('bb101_2018_new_natural').flagged).toBe(true);
    expect(pack('bb101_2018_new_natural').note).toMatch(/1500 ppm for either system/);
    expect(DEFAULT_ASSUMPTIONS.criteria.packs.flagged).toBe(true);
  });

  it('judges blocks built from 2019 as new build and older or unknown blocks as refurbishment', () => {
    expect(buildStatusOf(DEFAULT_ASSUMPTIONS, 2020)).toBe('new_build');
    expect(buildStatusOf(DEFAULT_ASSUMPTIONS, 1968)).toBe('refurbishment');
    expect(buildStatusOf(DEFAULT_ASSUMPTIONS, null)).toBe('refurbishment');
  });

  it('chooses the pack by ventilation class and build status', () => {
    expect(choosePack(DEFAULT_ASSUMPTIONS, 'natural', 'new_build').id).toBe('bb101_2018_new_natural');
    expect(choosePack(DEFAULT_ASSUMPTIONS, 'mechanical', 'refurbishment').id).toBe('bb101_2018_refurb_mechanical');
  });
});
