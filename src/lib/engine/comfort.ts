/**
 * Thermal-comfort indicators: ISO 7730:2005 PMV/PPD and draught rate, the CIBSE TM52 / EN 16798-1
 * adaptive limit and daily weighted exceedance, the steady daily-mean overheating screening index
 * (SAP Appendix P structure) and the Approved Document O glazing proxy (ISO 7730:2005; CIBSE TM52 (2013); EN 16798-1:2019; SAP 2012 Appendix P; Approved Document O (2021)).
 */
import { EngineInputError, requireRange } from './errors';

/**
 * Predicted mean vote, ISO 7730:2005 §4 (Fanger heat balance, iterative clothing surface temperature).
 * Valid ranges (ISO 7730): t_a 10–30 °C, t_r 10–40 °C, v 0–1 m/s, met 0.8–4, clo 0–2, RH 0–100 %;
 * out of range throws EngineInputError. Returns PMV (−3…+3 scale) and PPD (%).
 */
export function pmvPpd(args: {
  airTempC: number;
  radiantTempC: number;
  airSpeedMs: number;
  relativeHumidityPct: number;
  met: number;
  clo: number;
  externalWorkMet?: number;
}): {
  pmv: number;
  ppdPct: number;
} {
  const ta = requireRange('comfort.airTempC', args.airTempC, 10, 30, '°C');
  const tr = requireRange('comfort.radiantTempC', args.radiantTempC, 10, 40, '°C');
  const vel = requireRange('comfort.airSpeedMs', args.airSpeedMs, 0, 1, 'm/s');
  const rh = requireRange('comfort.relativeHumidityPct', args.relativeHumidityPct, 0, 100, '%');
  const met = requireRange('comfort.met', args.met, 0.8, 4, 'met');
  const clo = requireRange('comfort.clo', args.clo, 0, 2, 'clo');
  const wme = args.externalWorkMet ?? 0;

  // Water vapour pressure, Pa (the same air for every room of a set: computed once for it).
  let pa: number;
  if (ta === lastVapour.ta && rh === lastVapour.rh) pa = lastVapour.pa;
  else {
    pa = rh * 10 * Math.exp(16.6536 - 4030.183 / (ta + 235));
    lastVapour.ta = ta;
    lastVapour.rh = rh;
    lastVapour.pa = pa;
  }
  const icl = 0.155 * clo;
  const m = met * 58.15;
  const w = wme * 58.15;
  const mw = m - w;
  const fcl = icl <= 0.078 ? 1 + 1.29 * icl : 1.05 + 0.645 * icl;
  const hcf = 12.1 * Math.sqrt(vel);
  const taa = ta + 273;
  const tra = tr + 273;
  const tcla = taa + (35.5 - ta) / (3.5 * icl + 0.1);
  const p1 = icl * fcl;
  const p2 = p1 * 3.96;
  const p3 = p1 * 100;
  const p4 = p1 * taa;
  const tra100 = tra / 100;
  const tra4 = tra100 * tra100 * tra100 * tra100;
  const p5 = 308.7 - 0.028 * mw + p2 * tra4;
  let xn = tcla / 100;
  let xf = tcla / 50;
  let hc = hcf;
  let n = 0;
  while (Math.abs(xn - xf) > 0.00015) {
    xf = (xf + xn) / 2;
    const hcn = 2.38 * Math.sqrt(Math.sqrt(Math.abs(100 * xf - taa))); // |Δ|^0.25
    hc = Math.max(hcf, hcn);
    const xf2 = xf * xf;
    xn = (p5 + p4 * hc - p2 * xf2 * xf2) / (100 + p3 * hc);
    if (++n > 150) throw new EngineInputError('comfort', 'PMV iteration did not converge');
  }
  const tcl = 100 * xn - 273;
  const hl1 = 3.05 * 0.001 * (5733 - 6.99 * mw - pa);
  const hl2 = mw > 58.15 ? 0.42 * (mw - 58.15) : 0;
  const hl3 = 1.7 * 0.00001 * m * (5867 - pa);
  const hl4 = 0.0014 * m * (34 - ta);
  const xn2 = xn * xn;
  const hl5 = 3.96 * fcl * (xn2 * xn2 - tra4);
  const hl6 = fcl * hc * (tcl - ta);
  let ts: number;
  if (m === lastSensation.m) ts = lastSensation.ts;
  else {
    ts = 0.303 * Math.exp(-0.036 * m) + 0.028;
    lastSensation.m = m;
    lastSensation.ts = ts;
  }
  const pmv = ts * (mw - hl1 - hl2 - hl3 - hl4 - hl5 - hl6);
  return { pmv, ppdPct: ppdFromPmv(pmv) };
}

/** The last vapour pressure and thermal sensation coefficient pmvPpd computed (rooms of a run repeat them). */
const lastVapour = { ta: Number.NaN, rh: Number.NaN, pa: 0 };
const lastSensation = { m: Number.NaN, ts: 0 };

/** PPD = 100 − 95·exp(−0.03353·PMV⁴ − 0.2179·PMV²), % (ISO 7730:2005). */
export function ppdFromPmv(pmv: number): number {
  const p2 = pmv * pmv;
  return 100 - 95 * Math.exp(-0.03353 * p2 * p2 - 0.2179 * p2);
}

/**
 * Draught rate, ISO 7730:2005 (Fanger et al. 1988): DR = (34 − t_a)·(v − 0.05)^0.62·(0.37·v·Tu + 3.14), %;
 * v < 0.05 m/s uses 0.05; capped at 100 %. Local air 20–26 °C, v < 0.5 m/s, Tu 10–60 % (throws outside).
 */
export function draughtRatePct(args: {
  localAirTempC: number;
  localAirSpeedMs: number;
  turbulencePct: number;
}): number {
  const ta = requireRange('comfort.localAirTempC', args.localAirTempC, 20, 26, '°C');
  const v0 = requireRange('comfort.localAirSpeedMs', args.localAirSpeedMs, 0, 0.5, 'm/s');
  const tu = requireRange('comfort.turbulencePct', args.turbulencePct, 10, 60, '%');
  const v = Math.max(v0, 0.05);
  const dr = (34 - ta) * (v - 0.05) ** 0.62 * (0.37 * v * tu + 3.14);
  return Math.min(dr, 100);
}

/**
 * Maximum cold downdraught speed near the floor from a cold vertical surface (Heiselberg 1994, Building and
 * Environment 29(3); coefficients from memory): with ΔT surface-to-room K and surface height H m,
 *   x < 0.4 m: 0.055·sqrt(ΔT·H);  0.4–2 m: 0.095·sqrt(ΔT·H)/(x + 1.32);  x > 2 m: 0.028·sqrt(ΔT·H)   [m/s]
 * x = distance from the surface, m (≥ 0).
 */
export function coldDowndraughtSpeedMs(args: {
  surfaceDeltaTK: number;
  surfaceHeightM: number;
  distanceM: number;
}): number {
  const root = Math.sqrt(Math.max(0, args.surfaceDeltaTK) * Math.max(0, args.surfaceHeightM));
  if (args.distanceM < 0.4) return 0.055 * root;
  if (args.distanceM <= 2) return (0.095 * root) / (args.distanceM + 1.32);
  return 0.028 * root;
}

/** Adaptive upper limit T_max = 0.33·T_rm + 18.8 + offset (Cat II offset 3 K → +21.8), °C. CIBSE TM52 / EN 16798-1. */
export function adaptiveMaxTempC(runningMeanC: number, categoryOffsetK: number): number {
  return 0.33 * runningMeanC + 18.8 + categoryOffsetK;
}

/**
 * Running mean outdoor temperature from the last seven daily means (yesterday first), °C.
 * 'tm52_3_8': (T1 + 0.8T2 + 0.6T3 + 0.5T4 + 0.4T5 + 0.3T6 + 0.2T7)/3.8 (CIBSE TM52 approximation);
 * 'exact': weights 0.8^i normalised by their sum (open-source comfort-library implementation).
 */
export function runningMeanTempC(dailyMeansYesterdayFirst: readonly number[], form: 'tm52_3_8' | 'exact'): number {
  if (dailyMeansYesterdayFirst.length !== 7)
    throw new EngineInputError('dailyMeans', 'needs exactly seven daily means');
  const weights =
    form === 'tm52_3_8' ? [1, 0.8, 0.6, 0.5, 0.4, 0.3, 0.2] : [1, 0.8, 0.64, 0.512, 0.4096, 0.32768, 0.262144];
  let sum = 0;
  let wsum = 0;
  for (let i = 0; i < 7; i++) {
    sum += (weights[i] as number) * (dailyMeansYesterdayFirst[i] as number);
    wsum += weights[i] as number;
  }
  return form === 'tm52_3_8' ? sum / 3.8 : sum / wsum;
}

/** CIBSE TM52 criterion 2: W_e = Σ_h max(0, round(T_op,h − T_max)), hours × K. */
export function dailyWeightedExceedance(hourlyOperativeTempC: readonly number[], maxTempC: number): number {
  let we = 0;
  for (const t of hourlyOperativeTempC) {
    const d = Math.round(t - maxTempC);
    if (d > 0) we += d;
  }
  return we;
}

/**
 * Summer overheating screening index (the steady daily-mean balance of SAP 2012 Appendix P; method from memory):
 *   Φ_sol = A_g·g·F_F·F_sh·I_24;  Φ_int = Φ_occ·t_occ/24;  H = H_tr + 1.2·Q_24;  ΔT_24 = (Φ_sol + Φ_int)/H.
 * Glazing m², g 0–1, irradiance W/m², gains W, hours 0–24, H_tr W/K, Q_24 L/s. A ranking index, not compliance.
 */
export function overheatingIndex(args: {
  glazingAreaM2: number;
  gValue: number;
  frameFactor: number;
  shadingFactor: number;
  irradianceWm2: number;
  occupiedGainW: number;
  occupiedHours: number;
  fabricHeatTransferWPerK: number;
  meanVentilationLps: number;
}): { solarGainW: number; internalGainW: number; heatTransferWPerK: number; deltaTK: number } {
  const solarGainW = args.glazingAreaM2 * args.gValue * args.frameFactor * args.shadingFactor * args.irradianceWm2;
  const internalGainW = (args.occupiedGainW * args.occupiedHours) / 24;
  const heatTransferWPerK = args.fabricHeatTransferWPerK + 1.2 * args.meanVentilationLps;
  return { solarGainW, internalGainW, heatTransferWPerK, deltaTK: (solarGainW + internalGainW) / heatTransferWPerK };
}

/** Nearest of N/E/S/W for a bearing (quadrants centred on each point), or null when unknown. */
export function facingOf(orientationDeg: number | null): 'N' | 'E' | 'S' | 'W' | null {
  if (orientationDeg === null) return null;
  const b = ((orientationDeg % 360) + 360) % 360;
  if (b >= 315 || b < 45) return 'N';
  if (b < 135) return 'E';
  if (b < 225) return 'S';
  return 'W';
}

/**
 * Approved Document O (England, 2021) simplified method, Table 1.1, moderate-risk location: maximum glazing in
 * the most-glazed room as % of its floor area — cross-ventilated N 37, E 37, S 30, W 22; single-aspect
 * N/E 26, S 15, W 11 (secondary sources). A housing regulation, used here only as a proxy flag.
 */
export const APPROVED_DOCUMENT_O_ROOM_LIMITS_PCT = {
  cross: { N: 37, E: 37, S: 30, W: 22 },
  single: { N: 26, E: 26, S: 15, W: 11 },
} as const;

/** The AD O glazing proxy for one room. */
export function glazingProxy(args: {
  glazingAreaM2: number;
  floorAreaM2: number;
  orientationDeg: number | null;
  crossVentilated: boolean;
}): {
  label: string;
  facing: 'N' | 'E' | 'S' | 'W' | null;
  glazingToFloorPct: number;
  limitPct: number | null;
  exceeds: boolean;
} {
  const facing = facingOf(args.orientationDeg);
  const glazingToFloorPct = (100 * args.glazingAreaM2) / args.floorAreaM2;
  const limitPct =
    facing === null ? null : APPROVED_DOCUMENT_O_ROOM_LIMITS_PCT[args.crossVentilated ? 'cross' : 'single'][facing];
  return {
    label: 'Housing-regulation proxy (Approved Document O simplified method), not a school standard',
    facing,
    glazingToFloorPct,
    limitPct,
    exceeds: limitPct !== null && glazingToFloorPct > limitPct,
  };
}
