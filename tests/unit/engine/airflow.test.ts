import { describe, expect, it } from 'vitest';
import { infiltrationAchFromN50, infiltrationLps, n50FromPermeability } from '~/lib/engine/infiltration';
import {
  crossWindM3s,
  deGidsPhaff,
  singleSidedStackM3s,
  singleSidedWindM3s,
  warrenParkinsM3s,
  windowAirflowLps,
} from '~/lib/engine/window-airflow';

describe('single-sided windows (Warren & Parkins 1984, basis of BS 5925 / CIBSE AM10)', () => {
  it('wind: A 1.0 m², U 3 m/s → 0.0750 m³/s (Warren & Parkins 1984, by hand)', () => {
    expect(Math.abs(singleSidedWindM3s({ areaM2: 1, windSpeedMs: 3 }) - 0.075)).toBeLessThanOrEqual(1e-6);
  });

  it('stack: Cd 0.61, A 1.0, h 1.2 m, ΔT 10 K, T_mean 288.15 K → 0.12996 m³/s (Warren & Parkins 1984, by hand)', () => {
    const q = singleSidedStackM3s({
      dischargeCoefficient: 0.61,
      areaM2: 1,
      openingHeightM: 1.2,
      deltaTK: 10,
      meanTempK: 288.15,
    });
    expect(Math.abs(q - 0.12996)).toBeLessThanOrEqual(5e-5);
  });

  it('design value of worked example 2 is the larger, stack, 0.130 m³/s (Warren & Parkins 1984; docs/sources.md)', () => {
    const q = warrenParkinsM3s({
      dischargeCoefficient: 0.61,
      areaM2: 1,
      windSpeedMs: 3,
      openingHeightM: 1.2,
      deltaTK: 10,
      meanTempK: 288.15,
    });
    expect(Math.abs(q - 0.13)).toBeLessThanOrEqual(5e-4);
  });

  it('room airflow for example 2 (20 °C inside, 10 °C outside) is 129.96 L/s (Warren & Parkins 1984, by hand)', () => {
    const lps = windowAirflowLps({
      method: 'warren_parkins',
      cross: false,
      effectiveAreaM2: 1,
      windSpeed10Ms: 3,
      siteWindFactor: 1,
      openingHeightM: 1.2,
      indoorTempC: 20,
      outdoorTempC: 10,
      dischargeCoefficient: 0.61,
      deltaCp: 0.5,
    });
    expect(Math.abs(lps - 129.96)).toBeLessThanOrEqual(0.05);
  });
});

describe('de Gids & Phaff (1982)', () => {
  it('A 1.0, U10 3, H 1.2, ΔT 10 → U_eff 0.24698 m/s, Q 0.12349 m³/s (de Gids & Phaff 1982, by hand)', () => {
    const r = deGidsPhaff({ areaM2: 1, windSpeed10Ms: 3, openingHeightM: 1.2, deltaTK: 10 });
    expect(Math.abs(r.effectiveVelocityMs - 0.24698)).toBeLessThanOrEqual(5e-5);
    expect(Math.abs(r.flowM3s - 0.12349)).toBeLessThanOrEqual(5e-5);
  });

  it('calm and isothermal leaves the turbulence term: 0.05 m³/s per m² (de Gids & Phaff 1982)', () => {
    expect(deGidsPhaff({ areaM2: 1, windSpeed10Ms: 0, openingHeightM: 1.2, deltaTK: 0 }).flowM3s).toBeCloseTo(0.05, 12);
  });
});

describe('cross ventilation (BS 5925 §12 form)', () => {
  it('two 0.5 m² openings, Cd 0.61, U 3 m/s, ΔCp 0.5 → 0.45750 m³/s', () => {
    // Hand: A_w = 1/sqrt(1/0.5² + 1/0.5²) = 0.353553; Q = 0.61·0.353553·3·sqrt(0.5) = 0.457501 m³/s.
    const q = crossWindM3s({
      dischargeCoefficient: 0.61,
      windwardAreaM2: 0.5,
      leewardAreaM2: 0.5,
      windSpeedMs: 3,
      deltaCp: 0.5,
    });
    expect(Math.abs(q - 0.457501)).toBeLessThanOrEqual(1e-6);
  });
});

describe('infiltration (Kronvall–Persily rule, Sherman 1987)', () => {
  it('q50 15, A_env 2000 m², V 6000 m³ → n50 5.0 h⁻¹, n_inf 0.25 h⁻¹ (Kronvall–Persily rule named in Sherman 1987, by hand)', () => {
    const n50 = n50FromPermeability({ airPermeabilityM3hM2: 15, envelopeAreaM2: 2000, volumeM3: 6000 });
    expect(n50).toBe(5);
    expect(infiltrationAchFromN50(n50, 20)).toBe(0.25);
  });

  it('a 168 m³ classroom at 0.25 h⁻¹ gets 11.67 L/s (worked example 4, docs/sources.md)', () => {
    // envelope chosen so that n50 = 5: 15·A/168 = 5 → A = 56 m²
    expect(
      Math.abs(infiltrationLps({ airPermeabilityM3hM2: 15, envelopeAreaM2: 56, volumeM3: 168, divisor: 20 }) - 11.67),
    ).toBeLessThanOrEqual(0.005);
  });
});
