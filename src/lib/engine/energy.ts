/**
 * Ventilation heat loss, heat recovery, fuel and fan energy (CIBSE Guide A (2015) ch. 4 form Φ = ρ·c_p·Q·ΔT;
 * CIBSE TM41 (2006) degree-hours; EN 308 temperature ratio; SFP as in EN 16798-3).
 * Heat capacity of air ρ·c_p ≈ 1.2 W per (L/s·K) [CP].
 */

/** Instantaneous ventilation heat loss Φ_v = ρc_p·Q·(θ_i − θ_e), W. Q L/s; temperatures °C. */
export function ventilationHeatLossW(args: {
  flowLps: number;
  indoorTempC: number;
  outdoorTempC: number;
  airHeatCapacityWPerLpsK: number;
}): number {
  return args.airHeatCapacityWPerLpsK * args.flowLps * (args.indoorTempC - args.outdoorTempC);
}

/** Annual ventilation heat loss from occupied degree-hours, E = ρc_p·Q·DH_occ/1000, kWh (CIBSE TM41 (2006): energy = heat-loss coefficient × degree-hours). */
export function annualVentilationHeatKwh(args: {
  flowLps: number;
  degreeHoursKh: number;
  airHeatCapacityWPerLpsK: number;
}): number {
  return (args.airHeatCapacityWPerLpsK * args.flowLps * args.degreeHoursKh) / 1000;
}

/** Heat recovered by a unit of dry temperature ratio η (0–1), kWh: η·E (EN 308 dry temperature ratio). */
export function heatRecoveredKwh(args: { ventilationHeatKwh: number; heatRecoveryEfficiency: number }): number {
  return args.heatRecoveryEfficiency * args.ventilationHeatKwh;
}

/** Delivered fuel for a heat demand, kWh: heat / seasonal efficiency (COP for heat pumps), efficiency > 0. */
export function fuelForHeatKwh(args: { heatKwh: number; efficiency: number }): number {
  return args.heatKwh / args.efficiency;
}

/** Fan electricity E_fan = SFP·Q·t/1000, kWh. SFP W/(L/s) 0–5; Q L/s; t run hours (specific fan power as defined in EN 16798-3:2017). */
export function fanEnergyKwh(args: { specificFanPowerWPerLps: number; flowLps: number; runHours: number }): number {
  return (args.specificFanPowerWPerLps * args.flowLps * args.runHours) / 1000;
}

/**
 * Supply temperature after heat recovery, no fan heat: θ_sup = θ_e + η·(θ_i − θ_e), °C.
 * η the EN 308 supply-side temperature ratio (0–1).
 */
export function supplyTempAfterRecoveryC(args: {
  outdoorTempC: number;
  extractTempC: number;
  heatRecoveryEfficiency: number;
}): number {
  return args.outdoorTempC + args.heatRecoveryEfficiency * (args.extractTempC - args.outdoorTempC);
}

/** Net carbon saved, kgCO2e/yr: fuel avoided × its factor − fan electricity × the electricity factor (DESNZ conversion-factor method). */
export function netCarbonSavingKg(args: {
  fuelSavedKwh: number;
  fuelKgCo2ePerKwh: number;
  fanKwh: number;
  electricityKgCo2ePerKwh: number;
}): number {
  return args.fuelSavedKwh * args.fuelKgCo2ePerKwh - args.fanKwh * args.electricityKgCo2ePerKwh;
}
