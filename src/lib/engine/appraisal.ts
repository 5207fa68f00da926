/**
 * The heat-recovery retrofit of a room appraised against named baselines:
 *  (a) today's operation as registered;
 *  (b) the same airflow without heat recovery — through windows, or through the existing fans — the value of heat
 *      recovery itself;
 *  (c) where the units cost more, the cheapest option that meets the criterion without heat recovery.
 * Each baseline gets its own lines (heating, fan electricity, servicing, replacement), simple and discounted
 * payback and NPV (HM Treasury Green Book discounting, end-of-year flows). Heat: ρc_p·Q·DH (CIBSE TM41 degree-hour
 * form) over the hours of hours.ts; recovery: EN 308 dry temperature ratio; fans: SFP·Q·hours (EN 16798-3).
 */
import { fanEnergyKwh, supplyTempAfterRecoveryC } from './energy';
import { appraiseInvestment } from './finance';
import { formatGbp, formatInt, formatOneDecimal } from './format';
import type { SeasonHours } from './hours';
import { type Prepared, type PreparedDay, unitsFor } from './prepared';
import { capitalPerTonneCo2eGbp, pupilHoursPer1000Gbp, requiredOutdoorAirLps } from './retrofit';
import { minutesAboveThreshold } from './season-co2';
import type {
  AnnualLines,
  AppliedCriterion,
  BaselineAppraisal,
  BaselineId,
  ExistingSystem,
  HeatingUsed,
  HoursUsed,
  RoomAppraisal,
  Season,
  VentilationType,
} from './types';
import { label } from './vocabulary';
import { heatingSeasonLossKwh, lowestTotalLps, occupiedTotalLps, type SeasonFlows } from './ventilation';

/** One way of ventilating the room for a year: its flows per season, fans, servicing and capital. */
interface Scenario {
  flows: Record<Season, SeasonFlows>;
  /** The fans that run: specific fan power W/(L/s), flow L/s, hours a year. */
  fans: { sfp: number; lps: number; hours: number }[];
  maintenanceGbp: number;
  capitalGbp: number;
  lifeYears: number;
  /** Heat loss already known (the same air as another scenario with less recovered), kWh. */
  lossKwh?: number;
}

/** What the appraisal needs from the rest of the assessment. */
export interface AppraisalInputs {
  p: Prepared;
  day: PreparedDay;
  hours: Record<Season, SeasonHours>;
  degreeHoursKh: Record<Season, number>;
  volumeM3: number;
  pupils: number;
  ventilationType: VentilationType;
  existing: ExistingSystem;
  /** Existing fan flow today, L/s (0 for natural rooms). */
  existingFanLps: number;
  todayFlows: Record<Season, SeasonFlows>;
  generationLps: Record<Season, number>;
  target: AppliedCriterion;
  criterion: AppliedCriterion;
  meetsTargetToday: boolean;
  /** True when the room meets its own criterion today: units are then shown as an option, never recommended. */
  criterionMetToday: boolean;
  todayPupilHours: number;
  heating: HeatingUsed;
  hoursUsed: HoursUsed;
  winterOutdoorTempC: number;
}

/** One fan followed by others that keep running (no array spread on the hot path). */
function withFans(
  fan: { sfp: number; lps: number; hours: number },
  others: { sfp: number; lps: number; hours: number }[],
): { sfp: number; lps: number; hours: number }[] {
  const out = [fan];
  for (const o of others) out.push(o);
  return out;
}

/** Sum of fan energy of a scenario, kWh. */
function fanKwh(s: Scenario): number {
  let kwh = 0;
  for (const f of s.fans) kwh += fanEnergyKwh({ specificFanPowerWPerLps: f.sfp, flowLps: f.lps, runHours: f.hours });
  return kwh;
}

/** Replacement years and costs within the appraisal period: units replaced at the end of each life. */
function replacementsOf(capitalGbp: number, lifeYears: number, years: number): { year: number; costGbp: number }[] {
  const out: { year: number; costGbp: number }[] = [];
  if (capitalGbp === 0 || lifeYears >= years) return out;
  for (let year = lifeYears; year < years; year += lifeYears) out.push({ year, costGbp: capitalGbp });
  return out;
}

/** Merges two replacement schedules (the option's costs less the baseline's). */
function netReplacements(
  option: { year: number; costGbp: number }[],
  baseline: { year: number; costGbp: number }[],
): { year: number; costGbp: number }[] {
  // Each schedule has at most one entry a year; the option's years first, then years only the baseline has.
  if (baseline.length === 0) return option;
  const out: { year: number; costGbp: number }[] = [];
  for (const o of option) {
    let costGbp = o.costGbp;
    for (const b of baseline) if (b.year === o.year) costGbp -= b.costGbp;
    if (costGbp !== 0) out.push({ year: o.year, costGbp });
  }
  for (const b of baseline) {
    let shared = false;
    for (const o of option) if (o.year === b.year) shared = true;
    if (!shared && b.costGbp !== 0) out.push({ year: b.year, costGbp: -b.costGbp });
  }
  return out;
}

/** A season's flows with units running: windows as today times the share kept, the units' balanced flow. */
function withUnitsFlows(f: SeasonFlows, keptShare: number, balancedLps: number, recoveredLps: number): SeasonFlows {
  return {
    windowOccupiedLps: f.windowOccupiedLps * keptShare,
    windowEmptyLps: f.windowEmptyLps * keptShare,
    infiltrationLps: f.infiltrationLps,
    balancedLps,
    unbalancedLps: 0,
    recoveredLps,
  };
}

/** Occupancy-weighted pupil-hours a year above the risk threshold with a scenario's flows. */
function pupilHoursWith(a: AppraisalInputs, flows: Record<Season, SeasonFlows>): number {
  const seasons = a.p.set.seasons.value;
  // Season by season by name (a loop over season keys would look records up by a changing key).
  let total = 0;
  total += seasonPupilHours(a, flows.winter, a.generationLps.winter, seasons.winter.schoolDays);
  total += seasonPupilHours(a, flows.mid, a.generationLps.mid, seasons.mid.schoolDays);
  total += seasonPupilHours(a, flows.summer, a.generationLps.summer, seasons.summer.schoolDays);
  return total;
}

/** One season's share of pupilHoursWith. */
function seasonPupilHours(a: AppraisalInputs, f: SeasonFlows, g: number, schoolDays: number): number {
  const outdoor = a.p.set.air.outdoorCo2Ppm.value;
  const threshold = a.criterion.riskThresholdPpm;
  // Exact shortcut: each segment moves monotonically towards its steady state from outdoor CO2 at the start of
  // the day, so if even the lowest-flow steady state stays at or below the threshold, CO2 never exceeds it.
  if (outdoor + (1e6 * g) / lowestTotalLps(f) <= threshold) return 0;
  const minutes = minutesAboveThreshold({
    day: a.day,
    flows: f,
    generationLps: g,
    volumeM3: a.volumeM3,
    outdoorCo2Ppm: outdoor,
    thresholdPpm: threshold,
  });
  return (a.pupils * minutes * schoolDays) / 60;
}

/** A scenario's yearly ventilation heat loss over the heating hours and fan electricity, kWh. */
function energyOf(a: AppraisalInputs, s: Scenario): { lossKwh: number; fanKwh: number } {
  return {
    lossKwh:
      s.lossKwh ??
      heatingSeasonLossKwh({
        occupiedShare: a.day.occupiedShare,
        flows: s.flows,
        degreeHoursKh: a.degreeHoursKh,
        airHeatCapacityWPerLpsK: a.p.set.energy.airHeatCapacityWPerLpsK.value,
      }),
    fanKwh: fanKwh(s),
  };
}

/** The lines, payback and NPV of the option against one baseline. */
function against(
  a: AppraisalInputs,
  id: BaselineId,
  option: Scenario,
  optionEnergy: { lossKwh: number; fanKwh: number },
  baseline: Scenario,
  pupilHoursRemoved: number,
): BaselineAppraisal {
  const fin = a.p.set.finance;
  const base = energyOf(a, baseline);
  const heatingKwh = (base.lossKwh - optionEnergy.lossKwh) / a.heating.efficiency;
  const fan = base.fanKwh - optionEnergy.fanKwh;
  const annual: AnnualLines = {
    heatingKwh,
    heatingGbp: heatingKwh * a.heating.priceGbpPerKwh,
    heatingKgCo2e: heatingKwh * a.heating.carbonKgCo2ePerKwh,
    fanKwh: fan,
    fanGbp: fan * fin.electricityPriceGbpPerKwh.value,
    fanKgCo2e: fan * fin.electricityKgCo2ePerKwh.value,
    maintenanceGbp: baseline.maintenanceGbp - option.maintenanceGbp,
  };
  const net = annual.heatingGbp + annual.fanGbp + annual.maintenanceGbp;
  const capital = option.capitalGbp - baseline.capitalGbp;
  const years = fin.appraisalYears.value;
  const replacements =
    years > option.lifeYears || years > baseline.lifeYears
      ? netReplacements(
          replacementsOf(option.capitalGbp, option.lifeYears, years),
          replacementsOf(baseline.capitalGbp, baseline.lifeYears, years),
        )
      : [];
  const money = appraiseInvestment({
    capitalGbp: capital,
    annualSavingGbp: net,
    replacements,
    rate: fin.discountRate.value,
    years,
  });
  return {
    baseline: id,
    capitalCostGbp: capital,
    annual,
    annualNetSavingGbp: net,
    annualNetSavingKwh: annual.heatingKwh + annual.fanKwh,
    annualNetSavingKgCo2e: annual.heatingKgCo2e + annual.fanKgCo2e,
    replacements,
    simplePaybackYears: money.simplePaybackYears,
    discountedPaybackYears: money.discountedPaybackYears,
    npvGbp: money.npvGbp,
    pupilHoursRemovedPerYear: pupilHoursRemoved,
    runningCostPerPupilHourGbp: net < 0 && pupilHoursRemoved > 0 ? -net / pupilHoursRemoved : null,
    verdict: net < 0 ? 'costs_to_run' : money.npvGbp >= 0 ? 'pays_back' : 'saves_slowly',
  };
}

/** One plain sentence with a baseline's verdict and its figures (never "on energy alone": servicing is in it). */
export function baselineWords(b: BaselineAppraisal, appraisalYears: number): string {
  const net = b.annualNetSavingGbp;
  const a = b.annual;
  const name = label(b.baseline);
  if (b.verdict === 'costs_to_run')
    return `Against ${name}, the units cost about ${formatGbp(-net)} a year more to run (heating ${formatGbp(a.heatingGbp)}, fans ${formatGbp(a.fanGbp)}, servicing ${formatGbp(a.maintenanceGbp)})${
      b.runningCostPerPupilHourGbp !== null
        ? `, for ${formatInt(b.pupilHoursRemovedPerYear)} pupil-hours of poor air removed a year: about ${formatGbp2(b.runningCostPerPupilHourGbp)} a pupil-hour.`
        : `, and bring no better air than ${name}.`
    }`;
  if (b.verdict === 'pays_back')
    return `Against ${name}, the units save about ${formatGbp(net)} a year after fans and servicing and pay back in ${b.simplePaybackYears === null ? '—' : formatOneDecimal(b.simplePaybackYears)} years (${b.discountedPaybackYears === null ? '—' : formatOneDecimal(b.discountedPaybackYears)} discounted); NPV ${formatGbp(b.npvGbp)} over ${appraisalYears} years.`;
  return `Against ${name}, the units save about ${formatGbp(net)} a year after fans and servicing, which does not repay ${formatGbp(b.capitalCostGbp)} within ${appraisalYears} years (NPV ${formatGbp(b.npvGbp)}).`;
}

/** What a baseline is for this room, in words. */
export function baselineDescription(r: RoomAppraisal, id: BaselineId, ventilationType: VentilationType): string {
  const q = formatInt(r.installedSupplyLps);
  if (id === 'today')
    return `${label(ventilationType)} as registered: about ${formatInt(r.winterOutdoorAirTodayLps)} l/s of outdoor air in winter`;
  if (id === 'same_air_without_recovery')
    return r.replacesExistingLps > 0
      ? `the existing fans moving the same ${q} l/s without heat recovery`
      : `windows bringing the same ${q} l/s without heat recovery`;
  return `the cheapest compliant option without heat recovery: ${formatGbp(r.simplerOptionCapitalGbp)} for the same ${q} l/s`;
}

/** Pounds and pence, e.g. £0.42. */
function formatGbp2(x: number): string {
  return x < 0 ? `-£${(-x).toFixed(2)}` : `£${x.toFixed(2)}`;
}

/** How the air and the running cost change against today, in words that fit the direction of each. */
export function comparisonWords(r: RoomAppraisal): string {
  if (!r.feasible) return 'No units recommended, so running costs are unchanged.';
  const today = r.winterOutdoorAirTodayLps;
  const withUnits = r.winterOutdoorAirWithUnitsLps;
  const extraCost = -r.baselines.today.annualNetSavingGbp;
  const flow = `in winter about ${formatInt(today)} l/s of outdoor air reaches the room today and the units would bring ${formatInt(withUnits)} l/s`;
  if (withUnits > today + 0.5)
    return extraCost > 0
      ? `Better air costs energy here: ${flow}, so heating, fans and servicing would cost about ${formatGbp(extraCost)} a year more than today, although heat recovery saves ${formatGbp(r.baselines.same_air_without_recovery.annual.heatingGbp)} a year against bringing that air without it.`
      : `The units bring more air than today (${flow}) and still cost about ${formatGbp(-extraCost)} a year less to run: heat recovery covers the fans, servicing and the extra air.`;
  return extraCost > 0
    ? `The units bring no more air than today (${flow}) but cost about ${formatGbp(extraCost)} a year more to run: fans and servicing cost more than the heat they recover.`
    : `The units bring about the same or less air than today (${flow}) and cost about ${formatGbp(-extraCost)} a year less to run, because they recover heat that is lost today.`;
}

/** A baseline with nothing to compare: no units, no money. */
function nothing(id: BaselineId): BaselineAppraisal {
  return {
    baseline: id,
    capitalCostGbp: 0,
    annual: { heatingKwh: 0, heatingGbp: 0, heatingKgCo2e: 0, fanKwh: 0, fanGbp: 0, fanKgCo2e: 0, maintenanceGbp: 0 },
    annualNetSavingGbp: 0,
    annualNetSavingKwh: 0,
    annualNetSavingKgCo2e: 0,
    replacements: [],
    simplePaybackYears: 0,
    discountedPaybackYears: 0,
    npvGbp: 0,
    pupilHoursRemovedPerYear: 0,
    runningCostPerPupilHourGbp: null,
    verdict: 'saves_slowly',
  };
}

/** An appraisal with no units: the room needs none, or no catalogue combination reaches the flow. */
function noUnits(
  a: AppraisalInputs,
  requiredSupplyLps: number,
  replacesExistingLps: number,
  note: string,
): RoomAppraisal {
  const todayLps = occupiedTotalLps(a.todayFlows.winter);
  return {
    targetPackId: a.target.packId,
    requiredSupplyLps,
    installedSupplyLps: 0,
    replacesExistingLps,
    simplerOptionCapitalGbp: 0,
    units: [],
    unitCount: 0,
    unitModels: '',
    feasible: false,
    recommended: false,
    combinedSoundDbA: null,
    soundLimitMet: true,
    supplyTempC: null,
    capitalCostGbp: 0,
    lifeYears: 0,
    pupilHoursRemovedPerYear: 0,
    pupilHoursRemovedPer1000Gbp: null,
    headline: 'today',
    baselines: {
      today: nothing('today'),
      same_air_without_recovery: nothing('same_air_without_recovery'),
      simpler_option: null,
    },
    capitalPerTonneCo2eGbp: null,
    winterOutdoorAirTodayLps: todayLps,
    winterOutdoorAirWithUnitsLps: todayLps,
    notes: [note],
  };
}

/**
 * Sizes units for the winter design case (windows shut once units run; units take over any existing fan system
 * without heat recovery) and appraises them against each baseline.
 */
export function appraiseRetrofit(a: AppraisalInputs): RoomAppraisal {
  const set = a.p.set;
  const r = set.retrofit;
  const outdoor = set.air.outdoorCo2Ppm.value;
  const notes: string[] = [];
  const keepsExisting = a.existing.heatRecoveryEfficiency > 0 && a.existing.balance === 'balanced';
  const replacesExistingLps = keepsExisting || a.existing.balance === 'none' ? 0 : a.existingFanLps;
  const keptBalancedLps = keepsExisting ? a.existingFanLps : 0;

  const winter = a.todayFlows.winter;
  const needTotal = requiredOutdoorAirLps({
    generationLps: a.generationLps.winter,
    outdoorCo2Ppm: outdoor,
    meanLimitPpm: a.target.meanLimitPpm,
    maxLimitPpm: a.target.maxLimitPpm,
  });
  if (needTotal === null)
    return noUnits(a, 0, replacesExistingLps, 'The target limit is at or below outdoor CO2: no flow can meet it.');
  const forTarget = Math.ceil(needTotal - winter.infiltrationLps - keptBalancedLps);
  const requiredSupplyLps = Math.max(0, forTarget, Math.ceil(replacesExistingLps));
  if (requiredSupplyLps <= 0)
    return noUnits(
      a,
      0,
      0,
      'The existing heat-recovery supply and infiltration already reach the required flow in steady state; check controls and operation instead of adding units.',
    );
  const choice = unitsFor(a.p, requiredSupplyLps);
  if (choice === null)
    return noUnits(
      a,
      requiredSupplyLps,
      replacesExistingLps,
      `No combination of up to ${r.maxUnitsPerRoom.value} catalogue units supplies ${formatInt(requiredSupplyLps)} l/s: this room needs a bespoke design.`,
    );
  if (!choice.soundLimitMet)
    notes.push(
      `The units together reach about ${formatInt(choice.soundDbA)} dB(A), above the ${r.soundLimitDbA.value} dB(A) limit: an acoustic review is needed.`,
    );
  if (replacesExistingLps > 0)
    notes.push(
      `The units take over the existing ${label(a.ventilationType).toLowerCase()} system's ${formatInt(replacesExistingLps)} l/s; its servicing is taken as ${formatInt(100 * set.mechanical.existingMaintenanceShareOfUnits.value)} % of the units'.`,
    );

  const perf = choice.performance;
  const q = choice.flowLps;
  const years = set.finance.appraisalYears.value;
  if (years > perf.lifeYears)
    notes.push(
      `Units are replaced after ${perf.lifeYears} years within the ${years}-year appraisal (a separate line).`,
    );
  const summerOff = r.operation.value.summerMode === 'off';
  const runHours = a.hoursUsed.unitRunHoursPerYear;
  const schoolHours = a.hoursUsed.schoolHoursPerYear;
  const existingFanHours = schoolHours;
  const existingFans =
    a.existing.balance === 'none' || a.existingFanLps <= 0
      ? []
      : [{ sfp: a.existing.specificFanPowerWPerLps, lps: a.existingFanLps, hours: existingFanHours }];
  const existingMaintenance =
    replacesExistingLps > 0 ? set.mechanical.existingMaintenanceShareOfUnits.value * perf.maintenanceGbp : 0;
  const keptHru = keepsExisting ? existingFans : [];

  // With units: windows as today times the share kept, units' balanced flow (plus any existing heat-recovery unit).
  const keptRecoveredLps = keepsExisting ? a.existing.heatRecoveryEfficiency * keptBalancedLps : 0;
  // Season by season by name (a loop over season keys would look records up by a changing key).
  const kept = r.windowKeptWithUnits.value;
  const unitsLps = keptBalancedLps + q;
  const recoveredLps = keptRecoveredLps + perf.heatRecoveryEfficiency * q;
  const optionFlows: Record<Season, SeasonFlows> = {
    winter: withUnitsFlows(a.todayFlows.winter, kept.winter, unitsLps, recoveredLps),
    mid: withUnitsFlows(a.todayFlows.mid, kept.mid, unitsLps, recoveredLps),
    summer: summerOff ? a.todayFlows.summer : withUnitsFlows(a.todayFlows.summer, kept.summer, unitsLps, recoveredLps),
  };
  // Degree-hours of the seasons the units run: the same air without their recovery loses η·ρc_p·Q·DH more.
  let unitDegreeHours = 0;
  unitDegreeHours += a.degreeHoursKh.winter;
  unitDegreeHours += a.degreeHoursKh.mid;
  if (!summerOff) unitDegreeHours += a.degreeHoursKh.summer;
  const option: Scenario = {
    flows: optionFlows,
    fans: withFans({ sfp: perf.specificFanPowerWPerLps, lps: q, hours: runHours }, keptHru),
    maintenanceGbp: perf.maintenanceGbp,
    capitalGbp: choice.capitalCostGbp,
    lifeYears: perf.lifeYears,
  };
  const optionEnergy = energyOf(a, option);
  // The same flows with only the kept recovery: ρc_p·η·Q·DH/1000 more heat lost (heatingSeasonLossKwh's form).
  const sameAirLossKwh =
    optionEnergy.lossKwh +
    (set.energy.airHeatCapacityWPerLpsK.value * perf.heatRecoveryEfficiency * q * unitDegreeHours) / 1000;
  const optionPupilHours = pupilHoursWith(a, optionFlows);
  const removed = Math.max(0, a.todayPupilHours - optionPupilHours);

  // (a) Today as registered.
  const today: Scenario = {
    flows: a.todayFlows,
    fans: existingFans,
    maintenanceGbp: existingMaintenance,
    capitalGbp: 0,
    lifeYears: perf.lifeYears,
  };
  const todayWinterLps = occupiedTotalLps(a.todayFlows.winter);
  const optionWinterLps = occupiedTotalLps(optionFlows.winter);
  const vsToday = against(a, 'today', option, optionEnergy, today, removed);

  // (b) The same air without heat recovery: windows for natural rooms, the existing fans for mechanical ones.
  const byFans = replacesExistingLps > 0;
  const sameAir: Scenario = {
    flows: optionFlows,
    lossKwh: sameAirLossKwh,
    fans: byFans ? withFans({ sfp: a.existing.specificFanPowerWPerLps, lps: q, hours: runHours }, keptHru) : keptHru,
    maintenanceGbp: existingMaintenance,
    capitalGbp: 0,
    lifeYears: perf.lifeYears,
  };
  const vsSameAir = against(a, 'same_air_without_recovery', option, optionEnergy, sameAir, 0);

  // (c) The cheapest compliant option without heat recovery, where the units cost more.
  const simple = r.simplerOption.value;
  const simpleCapital = simple.capitalBaseGbp + simple.capitalGbpPerLps * q;
  let vsSimpler: BaselineAppraisal | null = null;
  if (!a.meetsTargetToday && simpleCapital < choice.capitalCostGbp) {
    const simpler: Scenario = {
      flows: optionFlows,
      lossKwh: sameAirLossKwh,
      fans: withFans({ sfp: simple.specificFanPowerWPerLps, lps: q, hours: runHours }, keptHru),
      maintenanceGbp: simple.annualMaintenanceGbp,
      capitalGbp: simpleCapital,
      lifeYears: simple.lifeYears,
    };
    vsSimpler = against(a, 'simpler_option', option, optionEnergy, simpler, 0);
  }

  let headline = set.finance.headlineBaseline.value;
  if (headline === 'simpler_option' && vsSimpler === null) {
    headline = 'today';
    notes.push(
      a.meetsTargetToday
        ? "Today's operation already meets the target, so it is the simpler option: headline figures are against today."
        : 'No cheaper compliant option than the units: headline figures are against today.',
    );
  }
  const baselines = { today: vsToday, same_air_without_recovery: vsSameAir, simpler_option: vsSimpler };
  const head = baselines[headline] ?? vsToday;

  const supplyTempC = supplyTempAfterRecoveryC({
    outdoorTempC: a.winterOutdoorTempC,
    extractTempC: set.energy.heatingIndoorTempC.value,
    heatRecoveryEfficiency: perf.heatRecoveryEfficiency,
  });
  if (a.criterionMetToday)
    notes.push(
      head.verdict === 'pays_back'
        ? 'No units needed for air: the room meets its criterion today. Heat recovery would still pay back against the headline baseline, as an energy saving.'
        : 'No units needed: the room meets its criterion today. The figures show what heat recovery would do for energy and money alone.',
    );
  if (supplyTempC < 16)
    notes.push(
      `Winter supply air about ${formatInt(supplyTempC)} °C after heat recovery: check throw and draught at head height.`,
    );

  return {
    targetPackId: a.target.packId,
    requiredSupplyLps,
    installedSupplyLps: q,
    replacesExistingLps,
    simplerOptionCapitalGbp: simpleCapital,
    units: choice.reported,
    unitCount: choice.count,
    unitModels: choice.models,
    feasible: true,
    recommended: !a.criterionMetToday,
    combinedSoundDbA: choice.soundDbA,
    soundLimitMet: choice.soundLimitMet,
    supplyTempC,
    capitalCostGbp: choice.capitalCostGbp,
    lifeYears: perf.lifeYears,
    pupilHoursRemovedPerYear: removed,
    pupilHoursRemovedPer1000Gbp: pupilHoursPer1000Gbp(removed, choice.capitalCostGbp),
    headline,
    baselines,
    capitalPerTonneCo2eGbp: capitalPerTonneCo2eGbp(head.capitalCostGbp, head.annualNetSavingKgCo2e, perf.lifeYears),
    winterOutdoorAirTodayLps: todayWinterLps,
    winterOutdoorAirWithUnitsLps: optionWinterLps,
    notes,
  };
}
