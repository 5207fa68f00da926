import { describe, expect, it } from 'vitest';
import {
  adaptiveMaxTempC,
  coldDowndraughtSpeedMs,
  dailyWeightedExceedance,
  draughtRatePct,
  facingOf,
  glazingProxy,
  overheatingIndex,
  pmvPpd,
  ppdFromPmv,
  runningMeanTempC,
} from '~/lib/engine/comfort';
import { EngineInputError } from '~/lib/engine/errors';
import adO from './fixtures/approved-document-o-table-1-1.json';
import draught from './fixtures/iso-7730-draught-rate.json';
import iso from './fixtures/iso-7730-pmv-ppd.json';

describe('PMV/PPD against ISO 7730:2005 validation rows', () => {
  iso.rows.forEach((row, i) => {
    it(`row ${i + 1}: ${row.ta}/${row.tr} °C, ${row.v} m/s, ${row.rh} %, ${row.met} met, ${row.clo} clo → PMV ${row.publishedPmv}, PPD ${row.publishedPpd} % (${iso.source})`, () => {
      const r = pmvPpd({
        airTempC: row.ta,
        radiantTempC: row.tr,
        airSpeedMs: row.v,
        relativeHumidityPct: row.rh,
        met: row.met,
        clo: row.clo,
      });
      expect(Math.abs(r.pmv - row.publishedPmv)).toBeLessThanOrEqual(iso.tolerancePublishedPmv + 1e-9);
      expect(Math.abs(r.ppdPct - row.publishedPpd)).toBeLessThanOrEqual(iso.tolerancePublishedPpdPct);
      expect(Math.abs(r.pmv - row.recomputedPmv)).toBeLessThanOrEqual(iso.toleranceRecomputedPmv);
      expect(Math.abs(r.ppdPct - row.recomputedPpd)).toBeLessThanOrEqual(iso.toleranceRecomputedPpdPct);
    });
  });

  it('row 1 gives PMV −0.75 and PPD 16.9 % (ISO 7730:2005 Annex D)', () => {
    const r = pmvPpd({ airTempC: 22, radiantTempC: 22, airSpeedMs: 0.1, relativeHumidityPct: 60, met: 1.2, clo: 0.5 });
    expect(Math.abs(r.pmv - -0.75)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.ppdPct - 16.9)).toBeLessThanOrEqual(0.5);
  });

  it('27/27 °C, 0.1 m/s, 60 %, 1.6 met, 0.5 clo gives PMV 1.17 and PPD 33.9 % (ISO 7730:2005 Annex D)', () => {
    const r = pmvPpd({ airTempC: 27, radiantTempC: 27, airSpeedMs: 0.1, relativeHumidityPct: 60, met: 1.6, clo: 0.5 });
    expect(Math.abs(r.pmv - 1.17)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.ppdPct - 33.9)).toBeLessThanOrEqual(0.5);
  });

  it('PPD is 5 % at PMV 0 (ISO 7730 PPD equation: 100 − 95)', () => {
    expect(ppdFromPmv(0)).toBe(5);
  });

  it('rejects an air temperature outside ISO 7730 applicability, naming the field', () => {
    expect(() =>
      pmvPpd({ airTempC: 35, radiantTempC: 22, airSpeedMs: 0.1, relativeHumidityPct: 50, met: 1.2, clo: 0.5 }),
    ).toThrow(EngineInputError);
    try {
      pmvPpd({ airTempC: 35, radiantTempC: 22, airSpeedMs: 0.1, relativeHumidityPct: 50, met: 1.2, clo: 0.5 });
    } catch (e) {
      expect((e as EngineInputError).field).toBe('comfort.airTempC');
    }
  });
});

describe('draught rate (ISO 7730:2005)', () => {
  for (const row of draught.rows) {
    it(`${row.ta} °C, ${row.v} m/s, Tu ${row.tu} % → DR ${row.dr} % (${draught.source}; ±${draught.tolerancePct})`, () => {
      expect(
        Math.abs(draughtRatePct({ localAirTempC: row.ta, localAirSpeedMs: row.v, turbulencePct: row.tu }) - row.dr),
      ).toBeLessThanOrEqual(draught.tolerancePct);
    });
  }
  it('20 °C, 0.15 m/s, Tu 40 % gives 18.0 % (ISO 7730:2005 draught-rate equation, by hand)', () => {
    expect(
      Math.abs(draughtRatePct({ localAirTempC: 20, localAirSpeedMs: 0.15, turbulencePct: 40 }) - 18.0),
    ).toBeLessThanOrEqual(0.1);
  });
});

describe('cold downdraught off glazing (Heiselberg 1994, coefficients from memory)', () => {
  it('meets itself at 0.4 m and 2 m, as the published ranges do', () => {
    // Hand: 0.095/(0.4 + 1.32) = 0.05523 ≈ 0.055; 0.095/(2 + 1.32) = 0.02861 ≈ 0.028 (per sqrt(ΔT·H)).
    const args = { surfaceDeltaTK: 4, surfaceHeightM: 1 }; // sqrt(4·1) = 2
    expect(
      Math.abs(
        coldDowndraughtSpeedMs({ ...args, distanceM: 0.39 }) - coldDowndraughtSpeedMs({ ...args, distanceM: 0.4 }),
      ),
    ).toBeLessThanOrEqual(0.0011);
    expect(
      Math.abs(
        coldDowndraughtSpeedMs({ ...args, distanceM: 2 }) - coldDowndraughtSpeedMs({ ...args, distanceM: 2.01 }),
      ),
    ).toBeLessThanOrEqual(0.0013);
  });

  it('gives 0.1122 m/s one metre from 1.5 m of glazing 5 K colder than the room', () => {
    // Hand: sqrt(5·1.5) = 2.7386; 0.095·2.7386/(1 + 1.32) = 0.11214 m/s
    expect(
      Math.abs(coldDowndraughtSpeedMs({ surfaceDeltaTK: 5, surfaceHeightM: 1.5, distanceM: 1 }) - 0.11214),
    ).toBeLessThanOrEqual(1e-5);
  });
});

describe('adaptive summer limits (CIBSE TM52 / EN 16798-1)', () => {
  it('T_rm 16 °C, Category II → T_max 27.08 °C (EN 16798-1:2019 / CIBSE TM52 adaptive limit, by hand)', () => {
    expect(adaptiveMaxTempC(16, 3)).toBeCloseTo(27.08, 10);
  });

  it('running mean of 20, 19, …, 14 °C is 17.947 °C (3.8 weights) and 17.858 °C (0.8^i normalised) (CIBSE TM52 running mean, by hand)', () => {
    const days = [20, 19, 18, 17, 16, 15, 14];
    expect(Math.abs(runningMeanTempC(days, 'tm52_3_8') - 17.947)).toBeLessThanOrEqual(0.001);
    expect(Math.abs(runningMeanTempC(days, 'exact') - 17.858)).toBeLessThanOrEqual(0.001);
  });

  it('example 11 hourly temperatures against T_max 27.08 give W_e = 8 (CIBSE TM52 criterion 2; worked example 11, docs/sources.md)', () => {
    expect(dailyWeightedExceedance([26.5, 27.6, 28.2, 28.9, 29.4, 28.3, 27.9], 27.08)).toBe(8);
  });
});

describe('overheating screening index (SAP 2012 Appendix P structure; worked example 10, docs/sources.md)', () => {
  const base = {
    glazingAreaM2: 12,
    gValue: 0.6,
    frameFactor: 0.8,
    shadingFactor: 1,
    irradianceWm2: 110,
    occupiedGainW: 31 * 70 + 400,
    occupiedHours: 7,
    fabricHeatTransferWPerK: 40,
    meanVentilationLps: (300 * 7 + 20 * 17) / 24,
  };

  it('south-facing classroom: Φ_sol 633.6 W, Φ_int 749.58 W, H 162.0 W/K, ΔT_24 8.54 K (worked example 10, by hand)', () => {
    const r = overheatingIndex(base);
    expect(r.solarGainW).toBeCloseTo(633.6, 9);
    expect(Math.abs(r.internalGainW - 749.58)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(r.heatTransferWPerK - 162.0)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(r.deltaTK - 8.54)).toBeLessThanOrEqual(0.01);
  });

  it('night ventilation of 150 L/s drops the index to 5.08 K; a north-facing twin gives 6.40 K (worked example 10, by hand)', () => {
    expect(
      Math.abs(overheatingIndex({ ...base, meanVentilationLps: (300 * 7 + 150 * 17) / 24 }).deltaTK - 5.08),
    ).toBeLessThanOrEqual(0.01);
    expect(Math.abs(overheatingIndex({ ...base, irradianceWm2: 50 }).deltaTK - 6.4)).toBeLessThanOrEqual(0.01);
  });
});

describe('Approved Document O glazing proxy', () => {
  for (const row of adO.rows) {
    it(`${row.facing}-facing room limits are ${row.cross} % cross-ventilated and ${row.single} % single-aspect (${adO.source})`, () => {
      expect(facingOf(row.bearingDeg)).toBe(row.facing);
      const floor = 100;
      const atCross = glazingProxy({
        glazingAreaM2: row.cross,
        floorAreaM2: floor,
        orientationDeg: row.bearingDeg,
        crossVentilated: true,
      });
      expect(atCross.limitPct).toBe(row.cross);
      expect(atCross.exceeds).toBe(false);
      expect(
        glazingProxy({
          glazingAreaM2: row.cross + 1,
          floorAreaM2: floor,
          orientationDeg: row.bearingDeg,
          crossVentilated: true,
        }).exceeds,
      ).toBe(true);
      const single = glazingProxy({
        glazingAreaM2: row.single + 1,
        floorAreaM2: floor,
        orientationDeg: row.bearingDeg,
        crossVentilated: false,
      });
      expect(single.limitPct).toBe(row.single);
      expect(single.exceeds).toBe(true);
    });
  }

  it('is labelled as a housing-regulation proxy and is not evaluated without an orientation', () => {
    const r = glazingProxy({ glazingAreaM2: 40, floorAreaM2: 56, orientationDeg: null, crossVentilated: false });
    expect(r.label).toMatch(/housing-regulation proxy/i);
    expect(r.limitPct).toBeNull();
    expect(r.exceeds).toBe(false);
  });
});
