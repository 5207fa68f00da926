import { describe, expect, it } from 'vitest';
import { assessRoom, DEFAULT_ASSUMPTIONS, EngineInputError, rankRooms, toRankInput } from '~/lib/engine/index';
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
