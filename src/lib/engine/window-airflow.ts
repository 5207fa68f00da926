/**
 * Window airflow capacity: single-sided (Warren & Parkins 1984; de Gids & Phaff 1982) and cross
 * ventilation (BS 5925:1991 / CIBSE AM10 style). All flows in m³/s unless named Lps.
 * These give capacity for the given opening; how far people open windows is applied by the caller.
 */

const G = 9.81; // m/s²

/**
 * Warren & Parkins (1984) single-sided wind-driven flow: Q_w = 0.025·A·U, m³/s.
 * A effective opening area 0–50 m²; U reference wind speed 0–30 m/s.
 */
export function singleSidedWindM3s(args: { areaM2: number; windSpeedMs: number }): number {
  return 0.025 * args.areaM2 * args.windSpeedMs;
}

/**
 * Warren & Parkins (1984) single-sided stack flow: Q_s = Cd·(A/3)·sqrt(g·h·|ΔT|/T_mean), m³/s.
 * Cd ≈ 0.61; A m²; h opening height 0.1–5 m; ΔT = θ_i − θ_e K; T_mean mean absolute temperature K.
 */
export function singleSidedStackM3s(args: {
  dischargeCoefficient: number;
  areaM2: number;
  openingHeightM: number;
  deltaTK: number;
  meanTempK: number;
}): number {
  return (
    args.dischargeCoefficient *
    (args.areaM2 / 3) *
    Math.sqrt((G * args.openingHeightM * Math.abs(args.deltaTK)) / args.meanTempK)
  );
}

/** Warren & Parkins design value: the larger of wind and stack, m³/s (as implemented for the method). */
export function warrenParkinsM3s(args: {
  dischargeCoefficient: number;
  areaM2: number;
  windSpeedMs: number;
  openingHeightM: number;
  deltaTK: number;
  meanTempK: number;
}): number {
  return Math.max(singleSidedWindM3s(args), singleSidedStackM3s(args));
}

/**
 * de Gids & Phaff (1982), Air Infiltration Review 4(1): Q = ½·A·U_eff,
 * U_eff = sqrt(C1·U10² + C2·H·|ΔT| + C3), C1 = 0.001, C2 = 0.0035 m/(s²·K), C3 = 0.01 m²/s².
 * A m²; U10 wind at 10 m, m/s; H opening height m; ΔT K.
 */
export function deGidsPhaff(args: { areaM2: number; windSpeed10Ms: number; openingHeightM: number; deltaTK: number }): {
  effectiveVelocityMs: number;
  flowM3s: number;
} {
  const effectiveVelocityMs = Math.sqrt(
    0.001 * args.windSpeed10Ms ** 2 + 0.0035 * args.openingHeightM * Math.abs(args.deltaTK) + 0.01,
  );
  return { effectiveVelocityMs, flowM3s: 0.5 * args.areaM2 * effectiveVelocityMs };
}

/**
 * Cross ventilation by wind, BS 5925:1991 §12 form (also CIBSE AM10): Q = Cd·A_w·U·sqrt(ΔCp), with
 * 1/A_w² = 1/A_windward² + 1/A_leeward², m³/s. Areas m²; U reference wind m/s; ΔCp 0–1.5.
 * The BS 5925 formula attribution is from memory (domain reference §4.1).
 */
export function crossWindM3s(args: {
  dischargeCoefficient: number;
  windwardAreaM2: number;
  leewardAreaM2: number;
  windSpeedMs: number;
  deltaCp: number;
}): number {
  const { windwardAreaM2: a1, leewardAreaM2: a2 } = args;
  if (a1 <= 0 || a2 <= 0) return 0;
  const aw = 1 / Math.sqrt(1 / (a1 * a1) + 1 / (a2 * a2));
  return args.dischargeCoefficient * aw * args.windSpeedMs * Math.sqrt(args.deltaCp);
}

/**
 * Window airflow of a room, L/s: single-sided by the chosen method, or cross ventilation with the openable
 * area split equally between two façades (the larger of cross-wind and single-sided stack through all of it).
 */
export function windowAirflowLps(args: {
  method: 'warren_parkins' | 'de_gids_phaff';
  cross: boolean;
  effectiveAreaM2: number;
  windSpeedMs: number;
  openingHeightM: number;
  indoorTempC: number;
  outdoorTempC: number;
  dischargeCoefficient: number;
  deltaCp: number;
}): number {
  const area = args.effectiveAreaM2;
  if (area <= 0) return 0;
  const deltaTK = args.indoorTempC - args.outdoorTempC;
  const meanTempK = 273.15 + (args.indoorTempC + args.outdoorTempC) / 2;
  const cd = args.dischargeCoefficient;
  // Stack term of Warren & Parkins: Cd·(A/3)·sqrt(g·h·|ΔT|/T_mean)
  const stack = cd * (area / 3) * Math.sqrt((G * args.openingHeightM * Math.abs(deltaTK)) / meanTempK);
  if (args.cross) {
    const wind = crossWindM3s({
      dischargeCoefficient: cd,
      windwardAreaM2: area / 2,
      leewardAreaM2: area / 2,
      windSpeedMs: args.windSpeedMs,
      deltaCp: args.deltaCp,
    });
    return 1000 * Math.max(wind, stack);
  }
  if (args.method === 'de_gids_phaff') {
    return (
      1000 *
      deGidsPhaff({ areaM2: area, windSpeed10Ms: args.windSpeedMs, openingHeightM: args.openingHeightM, deltaTK })
        .flowM3s
    );
  }
  return 1000 * Math.max(0.025 * area * args.windSpeedMs, stack);
}
