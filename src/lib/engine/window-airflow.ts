/**
 * Window airflow capacity: single-sided (Warren & Parkins 1984, "Single-sided ventilation through open windows",
 * Air Infiltration Centre; de Gids & Phaff 1982, Air Infiltration Review 4(1):4–5) and cross ventilation
 * (BS 5925:1991 §12; CIBSE AM10 (2005) §4). All flows in m³/s unless named Lps.
 * These give capacity for the given opening; how far people open windows is applied by the caller.
 */

const G = 9.81; // m/s²

/**
 * Warren & Parkins (1984) single-sided wind-driven flow: Q_w = 0.025·A·U, m³/s.
 * A effective opening area 0–50 m²; U local reference wind speed at the opening 0–30 m/s.
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
 * The clause attribution in BS 5925:1991 is from memory.
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
 * Window airflow capacity of a room, L/s, from the terms above (nothing restated):
 *  - single-sided, Warren & Parkins: the larger of wind and stack, with the local wind U_r = U10 × site factor
 *    (the reference wind of BS 5925:1991 at the opening);
 *  - single-sided, de Gids & Phaff: their formula is fitted to the 10 m meteorological wind, so U10 itself;
 *  - cross ventilation (BS 5925:1991 §12): the openable area split equally between two façades, the larger of the
 *    cross-wind flow at the local wind and the single-sided stack through all of it.
 * Areas m² (effective, ≥ 0); winds m/s; temperatures °C.
 */
export function windowAirflowLps(args: {
  method: 'warren_parkins' | 'de_gids_phaff';
  cross: boolean;
  effectiveAreaM2: number;
  /** Meteorological wind speed at 10 m, m/s. */
  windSpeed10Ms: number;
  /** Local wind at the opening ÷ 10 m wind. */
  siteWindFactor: number;
  openingHeightM: number;
  indoorTempC: number;
  outdoorTempC: number;
  dischargeCoefficient: number;
  deltaCp: number;
}): number {
  const area = args.effectiveAreaM2;
  if (area <= 0) return 0;
  const deltaTK = args.indoorTempC - args.outdoorTempC;
  if (args.method === 'de_gids_phaff' && !args.cross)
    return (
      1000 *
      deGidsPhaff({ areaM2: area, windSpeed10Ms: args.windSpeed10Ms, openingHeightM: args.openingHeightM, deltaTK })
        .flowM3s
    );
  const localWindMs = args.windSpeed10Ms * args.siteWindFactor;
  const opening = {
    dischargeCoefficient: args.dischargeCoefficient,
    areaM2: area,
    windSpeedMs: localWindMs,
    openingHeightM: args.openingHeightM,
    deltaTK,
    meanTempK: 273.15 + (args.indoorTempC + args.outdoorTempC) / 2,
  };
  if (!args.cross) return 1000 * warrenParkinsM3s(opening);
  const wind = crossWindM3s({
    dischargeCoefficient: args.dischargeCoefficient,
    windwardAreaM2: area / 2,
    leewardAreaM2: area / 2,
    windSpeedMs: localWindMs,
    deltaCp: args.deltaCp,
  });
  return 1000 * Math.max(wind, singleSidedStackM3s(opening));
}
