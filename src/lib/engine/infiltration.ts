/**
 * Infiltration from air permeability: n50 = q50·A_env/V, n_inf ≈ n50/20 (Kronvall–Persily rule, named in
 * Sherman 1987, Energy and Buildings 10:81–86; divisor 20 from memory; CIBSE TM23 (2000) relates leakage tests to infiltration).
 */

/** Air-change rate at 50 Pa, h⁻¹. q50 m³/(h·m²) 0.5–50; envelope area m² > 0; volume m³ > 0. */
export function n50FromPermeability(args: {
  airPermeabilityM3hM2: number;
  envelopeAreaM2: number;
  volumeM3: number;
}): number {
  return (args.airPermeabilityM3hM2 * args.envelopeAreaM2) / args.volumeM3;
}

/** Natural infiltration air-change rate, h⁻¹: n_inf = n50 / divisor (K-P rule, divisor ≈ 20, range ~10–30). */
export function infiltrationAchFromN50(n50PerH: number, divisor: number): number {
  return n50PerH / divisor;
}

/** Infiltration flow of a room, L/s: Q_inf = n_inf·V/3.6. */
export function infiltrationLps(args: {
  airPermeabilityM3hM2: number;
  envelopeAreaM2: number;
  volumeM3: number;
  divisor: number;
}): number {
  const n50 = n50FromPermeability(args);
  return (infiltrationAchFromN50(n50, args.divisor) * args.volumeM3) / 3.6;
}
