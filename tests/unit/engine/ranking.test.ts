import { describe, expect, it } from 'vitest';
import {
  assessRoom,
  DEFAULT_ASSUMPTIONS,
  DEFAULT_RANK_WEIGHTS,
  EngineInputError,
  rankRooms,
  toRankInput,
} from '~/lib/engine/index';
import type { RankInput } from '~/lib/engine/types';
import { typicalClassroom } from './helpers';

const row = (roomId: string, riskScore: number, ce: number | null, payback: number | null): RankInput => ({
  roomId,
  roomCode: roomId,
  pupils: 30,
  riskScore,
  riskBand: 'over',
  pupilHoursPerYearAbove: riskScore * 10000,
  thresholdPpm: 1500,
  criteriaMet: false,
  hasRetrofit: ce !== null,
  pupilHoursRemovedPer1000Gbp: ce,
  simplePaybackYears: payback,
  capitalCostGbp: ce === null ? null : 5000,
});

// Hand normalisation (each part ÷ best among rows; payback: shortest ÷ own):
//   A: risk 0.8/0.8 = 1,   cost-effectiveness 100/400 = 0.25, payback 10/20 = 0.5
//   B: risk 0.4/0.8 = 0.5, cost-effectiveness 400/400 = 1,    payback 10/10 = 1
//   C: risk 0.2/0.8 = 0.25, no retrofit → 0 and 0
const rows = [row('A', 0.8, 100, 20), row('B', 0.4, 400, 10), row('C', 0.2, null, null)];

describe('rankRooms', () => {
  it('puts the riskiest room first when only risk counts', () => {
    expect(rankRooms(rows, { risk: 1, costEffectiveness: 0, payback: 0 }).map((r) => r.roomId)).toEqual([
      'A',
      'B',
      'C',
    ]);
  });

  it('puts the best value for money first when only cost-effectiveness counts', () => {
    expect(rankRooms(rows, { risk: 0, costEffectiveness: 1, payback: 0 }).map((r) => r.roomId)).toEqual([
      'B',
      'A',
      'C',
    ]);
  });

  it('weighs the three parts equally: B 0.833, A 0.583, C 0.083', () => {
    // A = (1 + 0.25 + 0.5)/3 = 0.5833; B = (0.5 + 1 + 1)/3 = 0.8333; C = 0.25/3 = 0.0833
    const ranked = rankRooms(rows, { risk: 1, costEffectiveness: 1, payback: 1 });
    expect(ranked.map((r) => r.roomId)).toEqual(['B', 'A', 'C']);
    expect(ranked[0]?.score).toBeCloseTo(0.8333, 4);
    expect(ranked[1]?.score).toBeCloseTo(0.5833, 4);
    expect(ranked[2]?.score).toBeCloseTo(0.0833, 4);
    expect(ranked.map((r) => r.rank)).toEqual([1, 2, 3]);
  });

  it('gives each room a plain-language reason for its place', () => {
    const ranked = rankRooms(rows, { risk: 2, costEffectiveness: 1, payback: 0 });
    expect(ranked[0]?.rankReason).toBe(
      '1st of 3: daily mean over the limit: about 8,000 pupil-hours a year above 1,500 ppm; 100 pupil-hours of poor air removed per £1,000, payback 20 years (weighted most on risk).',
    );
    expect(ranked[2]?.rankReason).toMatch(/^3rd of 3: .*no catalogue units recommended/);
  });

  it('rejects negative or all-zero weights, naming the weight', () => {
    expect(() => rankRooms(rows, { risk: -1, costEffectiveness: 1, payback: 1 })).toThrow(EngineInputError);
    try {
      rankRooms(rows, { risk: -1, costEffectiveness: 1, payback: 1 });
    } catch (e) {
      expect((e as EngineInputError).field).toBe('weights.risk');
    }
    expect(() => rankRooms(rows, { risk: 0, costEffectiveness: 0, payback: 0 })).toThrow(EngineInputError);
  });

  it('ranks assessed rooms: a room with more pupils in the same space ranks above its quieter twin on risk', () => {
    const busy = typicalClassroom();
    const quiet = typicalClassroom();
    quiet.room.pupils = 12;
    const ranked = rankRooms(
      [
        toRankInput('quiet', assessRoom(quiet, DEFAULT_ASSUMPTIONS, { withCurve: false })),
        toRankInput('busy', assessRoom(busy, DEFAULT_ASSUMPTIONS, { withCurve: false })),
      ],
      { risk: 1, costEffectiveness: 0, payback: 0 },
    );
    expect(ranked[0]?.roomId).toBe('busy');
  });
});

/** Deterministic pseudo-random numbers in [0, 1) (mulberry32), so the rows below are the same on every run. */
function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * The rule as the ranking module's comment states it, restated here without its code: every part divided by the best
 * among the rows (risk ÷ highest risk; pupil-hours removed per £1,000 ÷ highest; shortest payback ÷ own payback, 1 for
 * a payback of 0, 0 without one), the weighted sum over the sum of the weights, highest first; ties to more
 * pupil-hours above the threshold, then to the smaller room id.
 */
function byHand(rows: RankInput[], w: { risk: number; costEffectiveness: number; payback: number }) {
  const best = (xs: (number | null)[], pick: (a: number, b: number) => number) =>
    xs.filter((x): x is number => x !== null).reduce<number | null>((m, x) => (m === null ? x : pick(m, x)), null);
  const highestRisk = best(
    rows.map((r) => r.riskScore),
    Math.max,
  );
  const highestCe = best(
    rows.map((r) => r.pupilHoursRemovedPer1000Gbp),
    Math.max,
  );
  const shortest = best(
    rows.map((r) => r.simplePaybackYears),
    Math.min,
  );
  const placed = rows.map((r) => {
    const risk = highestRisk ? r.riskScore / highestRisk : 0;
    const costEffectiveness =
      highestCe && r.pupilHoursRemovedPer1000Gbp !== null ? r.pupilHoursRemovedPer1000Gbp / highestCe : 0;
    let payback = 0;
    if (r.simplePaybackYears === 0) payback = 1;
    else if (r.simplePaybackYears !== null && shortest !== null) payback = shortest / r.simplePaybackYears;
    const score =
      (w.risk * risk + w.costEffectiveness * costEffectiveness + w.payback * payback) /
      (w.risk + w.costEffectiveness + w.payback);
    return { roomId: r.roomId, above: r.pupilHoursPerYearAbove, risk, costEffectiveness, payback, score };
  });
  const order = [...placed].sort((a, b) => {
    if (a.score !== b.score) return a.score > b.score ? -1 : 1;
    if (a.above !== b.above) return a.above > b.above ? -1 : 1;
    return a.roomId < b.roomId ? -1 : 1;
  });
  return order;
}

describe('rankRooms against a computation by hand of the stated rule', () => {
  // 400 invented rooms: a fifth without units (no cost-effectiveness, no payback), some paying back at once, and
  // groups of exact twins (same parts) that only the pupil-hours or the room id can separate.
  const random = seeded(20261202);
  const many: RankInput[] = [];
  for (let i = 0; i < 400; i += 1) {
    const id = `room-${String(1000 - i).padStart(4, '0')}`;
    const twin = i % 25 < 4 ? many[i - (i % 25)] : undefined;
    const withUnits = random() > 0.2;
    const base = twin ?? {
      ...row(id, Math.round(random() * 1000) / 1000, withUnits ? Math.round(random() * 800) : null, null),
      simplePaybackYears: withUnits ? (random() < 0.05 ? 0 : Math.round(random() * 600) / 10) : null,
    };
    many.push({
      ...base,
      roomId: id,
      roomCode: id,
      pupilHoursPerYearAbove: twin && i % 25 === 3 ? base.pupilHoursPerYearAbove - 1 : base.pupilHoursPerYearAbove,
    });
  }

  for (const weights of [
    { risk: 0.6, costEffectiveness: 0.3, payback: 0.1 },
    { risk: 0, costEffectiveness: 0.2, payback: 0.8 },
    { risk: 1, costEffectiveness: 1, payback: 1 },
    { risk: 5, costEffectiveness: 0, payback: 0 },
  ]) {
    it(`orders, scores and normalises 400 rooms as the rule says (weights ${JSON.stringify(weights)})`, () => {
      const expected = byHand(many, weights);
      const ranked = rankRooms(many, weights);
      expect(ranked.map((r) => r.roomId)).toEqual(expected.map((r) => r.roomId));
      expect(ranked.map((r) => r.rank)).toEqual(expected.map((_, i) => i + 1));
      ranked.forEach((r, i) => {
        const e = expected[i]!;
        expect(r.score).toBeCloseTo(e.score, 12);
        expect(r.parts.risk).toBeCloseTo(e.risk, 12);
        expect(r.parts.costEffectiveness).toBeCloseTo(e.costEffectiveness, 12);
        expect(r.parts.payback).toBeCloseTo(e.payback, 12);
      });
      // Normalised: the best room on each part scores exactly 1 there, and no part or score leaves 0–1.
      for (const part of ['risk', 'costEffectiveness', 'payback'] as const)
        expect(Math.max(...ranked.map((r) => r.parts[part]))).toBe(1);
      expect(ranked.every((r) => r.score >= 0 && r.score <= 1)).toBe(true);
    });
  }

  it('breaks exact ties by pupil-hours above the threshold, then by the smaller room id', () => {
    const twins = [
      { ...row('b', 0.5, 100, 10), pupilHoursPerYearAbove: 300 },
      { ...row('c', 0.5, 100, 10), pupilHoursPerYearAbove: 300 },
      { ...row('a', 0.5, 100, 10), pupilHoursPerYearAbove: 200 },
    ];
    expect(rankRooms(twins, DEFAULT_RANK_WEIGHTS).map((r) => r.roomId)).toEqual(['b', 'c', 'a']);
  });
});
