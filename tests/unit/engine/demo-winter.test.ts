/**
 * The demo estate's predicted winter CO2 against a named UK field study. Coley & Beisteiner (2002), "Carbon
 * dioxide levels and ventilation rates in schools", International Journal of Ventilation 1(1): seven classrooms
 * in four UK schools measured in the heating season averaged 1,957 ppm over the occupied period, with about
 * 1.38 l/s per person of outdoor air (0.84 ach); some classrooms exceeded the 4,000 ppm range of the monitors at
 * their peaks (abstract, AIVC record). Tolerances: the estate's mean daily mean within ±20 % of 1,957 ppm; the
 * median outdoor air per person within ±40 % of 1.38 l/s; no classroom's winter daily MEAN above 4,000 ppm
 * (the field saw that only at peaks).
 */
import { describe, expect, it } from 'vitest';
import { DEMO_SCHOOLS, demoRooms } from '../../../scripts/seed/demo-trust';
import { assessRoom, DEFAULT_ASSUMPTIONS } from '~/lib/engine/index';
import type { RoomAssessmentInput } from '~/lib/engine/types';

function demoNaturalClassrooms() {
  const out: { mean: number; lpsPerPerson: number }[] = [];
  for (const [index, school] of DEMO_SCHOOLS.entries()) {
    for (const room of demoRooms(school, index)) {
      if (room.use !== 'classroom' || !room.ventilationType.startsWith('natural')) continue;
      const block = school.blocks.find((b) => b.name === room.blockName);
      if (!block) continue;
      const input = {
        room: { ...room, winterWindowOpenFraction: null },
        block: {
          yearBuilt: block.yearBuilt,
          constructionType: block.constructionType,
          airPermeabilityM3hM2: block.airPermeabilityM3hM2,
          heatingFuel: block.heatingFuel,
          fuelPriceGbpPerKwh: block.fuelPriceGbpPerKwh ?? null,
          heatingEfficiency: block.heatingEfficiency ?? null,
          heatingInstalledYear: block.heatingInstalledYear,
        },
        school: {
          phase: school.phase,
          climateRegion: school.climateRegion,
          heatingFuel: school.heatingFuel,
          fuelPriceGbpPerKwh: school.fuelPriceGbpPerKwh,
          heatingEfficiency: school.heatingEfficiency,
          timetable: null,
        },
      } as unknown as RoomAssessmentInput;
      const a = assessRoom(input, DEFAULT_ASSUMPTIONS, { withCurve: false });
      out.push({
        mean: a.seasons.winter.occupiedMeanCo2Ppm,
        lpsPerPerson: a.seasons.winter.ventilation.totalLps / a.occupants,
      });
    }
  }
  return out;
}

describe('the demo estate in winter against UK field evidence (Coley & Beisteiner 2002)', () => {
  const rooms = demoNaturalClassrooms();
  const mean = rooms.reduce((s, r) => s + r.mean, 0) / rooms.length;
  const perPerson = rooms.map((r) => r.lpsPerPerson).sort((a, b) => a - b);
  const median = perPerson[Math.floor(perPerson.length / 2)] as number;

  it('assesses the naturally ventilated demo classrooms', () => {
    expect(rooms.length).toBeGreaterThan(100);
  });

  it('averages a winter daily mean within ±20 % of the 1,957 ppm measured', () => {
    expect(Math.abs(mean - 1957) / 1957).toBeLessThanOrEqual(0.2);
  });

  it('gives a median outdoor air per person within ±40 % of the 1.38 l/s measured', () => {
    expect(Math.abs(median - 1.38) / 1.38).toBeLessThanOrEqual(0.4);
  });

  it('predicts no winter daily mean above 4,000 ppm', () => {
    expect(Math.max(...rooms.map((r) => r.mean))).toBeLessThanOrEqual(4000);
  });
});
