/**
 * The default assumption set. Every value carries its source, the status tag of the domain reference
 * (confirmed / secondary / from_memory / common_practice) and who edits it (technical / financial).
 * Values tagged from_memory or flagged must be shown as editable assumptions in the app and in exports.
 */
import type { Assumed, AssumptionKind, AssumptionSet, SourceStatus } from './types';
import { CLIMATE_REGION_DATA, CLIMATE_SOURCE } from './climate-regions';
import { CRITERIA_PACKS } from './criteria';
import { GENERATION_TABLE_4 } from './occupancy';

/** Build an Assumed value; keeps the table below readable. */
function a<T>(
  value: T,
  unit: string,
  label: string,
  source: string,
  status: SourceStatus,
  kind: AssumptionKind,
  extra: { flagged?: boolean; note?: string } = {},
): Assumed<T> {
  return { value, unit, label, source, status, kind, ...extra };
}

const T = 'technical' as const;
const F = 'financial' as const;

/** The default AssumptionSet shipped with Airtally. */
export const DEFAULT_ASSUMPTIONS: AssumptionSet = {
  version: 'airtally-default-2026.1',
  dated: '2026-12-01',
  air: {
    outdoorCo2Ppm: a(420, 'ppm', 'Outdoor CO2', 'Mauna Loa annual mean 2023 ≈ 421 ppm (NOAA GML); UK outdoor 410–450 ppm typical', 'common_practice', T, {
      note: 'Raise near busy roads; older guidance used 350–400 ppm.',
    }),
    atmosphericPressureKpa: a(101.325, 'kPa', 'Atmospheric pressure', 'Standard atmosphere', 'confirmed', T),
  },
  occupancy: {
    generationTable: a(GENERATION_TABLE_4, 'L/s at 0 °C', 'CO2 generation per person (Persily & de Jonge Table 4)', 'Persily & de Jonge (2017) Indoor Air 27(5):868–879, Table 4', 'confirmed', T),
    pupilMetByUse: a(
      {
        classroom: 1.4,
        science_lab: 1.6,
        practical: 1.6,
        ict_room: 1.2,
        music_room: 1.6,
        hall: 1.4,
        sports_hall: 3.0,
        library: 1.2,
        office: 1.2,
        staff_room: 1.2,
        other: 1.4,
      },
      'met',
      'Pupil activity level by room use',
      'Seated lesson 1.2–1.4, practical 1.6–2.0, PE 3–4 met (activity assignment in the domain reference)',
      'common_practice',
      T,
    ),
    pupilMetAdjustByAge: a(
      { early_years: 0.2, primary: -0.2, secondary: 0, sixth_form: 0, adult: 0 },
      'met',
      'Activity adjustment by age group',
      'Seated primary lessons at 1.2 met vs secondary 1.4 met; early years more active',
      'common_practice',
      T,
    ),
    adultMet: a(1.6, 'met', 'Teacher activity level', 'Teacher standing/moving 1.6 met', 'common_practice', T),
    timetable: a(
      [
        { label: 'Lesson 1', kind: 'lesson', startMinute: 540, endMinute: 600, occupancyFraction: 1 },
        { label: 'Lesson 2', kind: 'lesson', startMinute: 600, endMinute: 660, occupancyFraction: 1 },
        { label: 'Break', kind: 'break', startMinute: 660, endMinute: 675, occupancyFraction: 0 },
        { label: 'Lesson 3', kind: 'lesson', startMinute: 675, endMinute: 735, occupancyFraction: 1 },
        { label: 'Lunch', kind: 'lunch', startMinute: 735, endMinute: 795, occupancyFraction: 0 },
        { label: 'Lesson 4', kind: 'lesson', startMinute: 795, endMinute: 855, occupancyFraction: 1 },
        { label: 'Lesson 5', kind: 'lesson', startMinute: 855, endMinute: 915, occupancyFraction: 1 },
      ],
      'minutes after midnight',
      'School day timetable (09:00–15:15)',
      'Typical UK secondary day; BB101 (2018) averages over the occupied period including breaks and lunch',
      'common_practice',
      T,
    ),
    teachingUses: a(
      ['classroom', 'science_lab', 'practical', 'ict_room', 'music_room', 'library'],
      'list',
      'Room uses judged against the CO2 criteria',
      'BB101 (2018) applies to teaching and learning spaces',
      'common_practice',
      T,
    ),
  },
  seasons: a(
    {
      winter: { months: [12, 1, 2], schoolDays: 50, indoorTempC: 20, windowOpenFractionOccupied: 0.1, windowOpenFractionEmpty: 0.1 },
      mid: { months: [3, 4, 10, 11], schoolDays: 67, indoorTempC: 21, windowOpenFractionOccupied: 0.3, windowOpenFractionEmpty: 0.3 },
      summer: { months: [5, 6, 7, 9], schoolDays: 73, indoorTempC: 24, windowOpenFractionOccupied: 0.7, windowOpenFractionEmpty: 0.7 },
    },
    'table',
    'Seasons: months, school days, room temperature and how far windows are opened',
    '190 school days a year split by term dates; window opening falls in cold weather (field surveys of classroom window use)',
    'from_memory',
    T,
    { note: 'Window opening fractions are the largest single uncertainty: calibrate against logged CO2 where available.' },
  ),
  climate: {
    regions: a(CLIMATE_REGION_DATA, 'table', 'Outdoor climate by region', CLIMATE_SOURCE, 'from_memory', T, {
      note: 'Approximate regional averages recalled from Met Office 1991–2020 climate summaries; replace with the school’s nearest station.',
    }),
    daytimeOffsetK: a(2, 'K', 'School-hours temperature above the 24-hour mean', 'Daytime outdoor temperatures exceed the daily mean by about half the diurnal range', 'common_practice', T),
  },
  windows: {
    method: a('warren_parkins', '-', 'Single-sided window formula', 'Warren & Parkins (1984), basis of BS 5925:1991 / CIBSE AM10 single-sided formulas; de Gids & Phaff (1982) is the alternative', 'confirmed', T),
    dischargeCoefficient: a(0.61, '-', 'Discharge coefficient of an opening', 'Warren & Parkins (1984) as implemented in an open-source Modelica library', 'confirmed', T),
    openingHeightM: a(1.2, 'm', 'Height of a window opening', 'Typical classroom casement height', 'common_practice', T),
    effectiveOpeningFactor: a(
      { side_hung: 0.9, top_hung: 0.6, bottom_hung: 0.5, sliding_sash: 1, tilt_and_turn: 0.7, pivot: 0.9, fixed: 0 },
      '-',
      'Effective share of the openable area by window type',
      'Hinged sashes open less free area than their frame area; recalled ranges, no single source',
      'from_memory',
      T,
    ),
    crossWindDeltaCp: a(0.5, '-', 'Wind pressure-coefficient difference (cross ventilation)', 'Typical ΔCp for a sheltered façade pair in BS 5925 / CIBSE AM10 style calculations', 'from_memory', T),
    siteWindFactor: a(0.5, '-', 'Local wind at the window ÷ met-station wind at 10 m', 'Suburban shelter reduces local wind to roughly half the 10 m open-country speed', 'common_practice', T),
    windowUseWithMechanical: a(0.5, '-', 'Window use in mechanically ventilated rooms (× season fraction)', 'Occupants open windows less when fans supply air', 'common_practice', T),
  },
  infiltration: {
    kpDivisor: a(20, '-', 'Kronvall–Persily divisor (n_inf = n50 / divisor)', 'K-P rule named in Sherman (1987) Energy and Buildings 10:81–86; value 20', 'from_memory', T),
    envelopeAreaPerFloorArea: a(1.0, 'm²/m²', 'Exposed envelope per m² of floor', 'One external wall plus a share of roof and ground floor for a typical classroom', 'common_practice', T),
    defaultAirPermeabilityByConstruction: a(
      { solid_masonry: 15, cavity_masonry: 12, system_built: 20, timber_frame: 10, steel_frame: 12, concrete_frame: 12, modular: 8 },
      'm³/(h·m²) @ 50 Pa',
      'Air permeability when not measured, by construction',
      'Older school blocks 10–25+, masonry with sashes 10–20 (recalled surveys)',
      'from_memory',
      T,
    ),
    defaultAirPermeabilityByEra: a(
      { before1980: 15, from1980to2005: 12, from2006: 8, unknown: 12 },
      'm³/(h·m²) @ 50 Pa',
      'Air permeability when not measured and construction unknown, by year built',
      'Part L backstop 10 for new non-domestic buildings before 2022 (secondary); older blocks leakier (recalled)',
      'from_memory',
      T,
    ),
  },
  mechanical: {
    defaultSupplyLpsPerPerson: a(5, 'L/s per person', 'Mechanical supply when not recorded', 'BB101 (2018) minimum average fresh-air rate 5 L/s per person (trade-press summary)', 'secondary', T),
    ventilationClass: a(
      {
        natural_single_sided: 'natural',
        natural_cross: 'natural',
        mechanical_extract: 'mechanical',
        mechanical_supply_extract: 'mechanical',
        heat_recovery_unit: 'mechanical',
        hybrid: 'natural',
      },
      'table',
      'Which BB101 criteria (natural or mechanical) each ventilation type is judged by',
      'BB101 (2018): hybrid systems use mechanical criteria only while in mechanical mode',
      'common_practice',
      T,
    ),
  },
  criteria: {
    packs: a(CRITERIA_PACKS, 'table', 'CO2 criteria packs', 'BB101 (2018) via secondary summaries; EN 16798-1:2019 Annex B', 'secondary', T, {
      flagged: true,
      note: 'BB101 20-minute cap: sources disagree (2000 ppm natural / 1500 ppm mechanical vs 1500 ppm for either system). Resolve against the primary text.',
    }),
    family: a('bb101_2018', '-', 'Criteria used', 'UK schools guidance by default', 'common_practice', T),
    enCategory: a('II', '-', 'EN 16798-1 category (when EN criteria are used)', 'EN 16798-1:2019 Category II = normal expectation', 'secondary', T),
    buildStatus: a('by_year_built', '-', 'New-build or refurbishment criteria', 'New-build limits for blocks built under BB101 (2018); refurbishment limits otherwise', 'common_practice', T),
    newBuildFromYear: a(2019, 'year', 'First year of build judged as new build', 'BB101 (2018) published August 2018', 'common_practice', T),
    referenceThresholdsPpm: a([1000, 1500, 2000], 'ppm', 'Thresholds always reported', 'BB101 (2006/2018) figures', 'secondary', T),
  },
  risk: {
    bandUpperPupilHours: a([250, 2500, 10000], 'pupil-hours a year', 'Risk band limits (fresh / stuffy / stale / very stale)', 'Airtally screening rule; no published banding', 'common_practice', T, {
      note: 'Our own banding: 2,500 pupil-hours ≈ a class of 30 over the threshold for half an hour a day all year.',
    }),
    scoreHalfPupilHours: a(5000, 'pupil-hours a year', 'Pupil-hours at which the risk score is 0.5', 'Airtally screening rule', 'common_practice', T),
  },
  energy: {
    heatingIndoorTempC: a(20, '°C', 'Heated room temperature', 'Occupied classroom set point; domain reference §5.2', 'common_practice', T),
    heatingCutoffTempC: a(14, '°C', 'Outdoor temperature above which recovered heat is not useful', 'Classroom gains cover the load above 12–15 °C (domain reference §5.2)', 'common_practice', T),
    airHeatCapacityWPerLpsK: a(1.2, 'W/(L/s·K)', 'Heat capacity of air (ρ·c_p)', '1.2 kg/m³ × 1.005 kJ/(kg·K)', 'common_practice', T),
    heatGeneratorEfficiency: a(
      { gas: 0.85, oil: 0.85, lpg: 0.85, electric: 1, heat_pump: 2.8, biomass: 0.8, district_heat: 1 },
      '-',
      'Seasonal efficiency of heating plant (COP for heat pumps)',
      'Boilers 0.70–0.92 seasonal (domain reference §6.2); heat-pump SCOP recalled',
      'from_memory',
      T,
    ),
  },
  comfort: {
    defaultGlazingGValue: a(0.6, '-', 'Glazing g-value when not recorded', 'Typical double glazing', 'common_practice', T),
    glazingUValueWm2K: a(2.8, 'W/(m²·K)', 'Glazing U-value', 'Older double glazing, recalled', 'from_memory', T),
    wallUValueWm2K: a(1.0, 'W/(m²·K)', 'External wall U-value', 'Uninsulated 1960s–1980s school walls, recalled', 'from_memory', T),
    frameFactor: a(0.8, '-', 'Frame factor (glazed share of window)', 'SAP Appendix P style default', 'from_memory', T),
    shadingFactor: a(1, '-', 'Shading factor (1 = no shading)', 'Unshaded worst case', 'common_practice', T),
    julyIrradianceWm2: a({ N: 50, E: 95, S: 110, W: 95, unknown: 85 }, 'W/m²', '24-hour mean July irradiance on a vertical façade', 'Illustrative values of domain reference example 10 (N 50, S 110); E/W interpolated', 'from_memory', T, {
      flagged: true,
      note: 'Illustrative inputs, not sourced data: replace with CIBSE Guide A or SAP regional tables.',
    }),
    sensibleGainPerPersonW: a(70, 'W', 'Sensible heat per occupant', 'Seated occupant sensible gain (domain reference example 10)', 'common_practice', T),
    equipmentLightingGainW: a(400, 'W', 'Lighting and equipment gain while occupied', 'Domain reference example 10', 'common_practice', T),
    winterClothingClo: a(1.0, 'clo', 'Winter clothing', 'ISO 7730 typical winter indoor clothing', 'common_practice', T),
    winterRelativeHumidityPct: a(40, '%', 'Winter relative humidity', 'Heated UK classrooms in winter', 'common_practice', T),
    winterAirSpeedMs: a(0.1, 'm/s', 'Occupied-zone air speed in winter', 'Keep ≤ 0.15 m/s in the heating season', 'common_practice', T),
    draughtTurbulencePct: a(40, '%', 'Turbulence intensity for the draught rate', 'ISO 7730 default when unknown', 'from_memory', T),
    deskDistanceFromWindowM: a(1, 'm', 'Distance of the first desks from the windows', 'Typical classroom layout', 'common_practice', T),
    insideSurfaceResistanceM2KW: a(0.13, 'm²·K/W', 'Inside surface resistance', 'BS EN ISO 6946 horizontal heat flow', 'from_memory', T),
    summerNightOpenFraction: a(0, '-', 'Windows open at night in summer', 'Windows usually shut overnight for security', 'common_practice', T),
    adaptiveCategoryOffsetK: a(3, 'K', 'Adaptive upper limit above comfort temperature (Category II)', 'EN 16798-1 / CIBSE TM52: T_max = 0.33·T_rm + 18.8 + 3', 'confirmed', T),
  },
  finance: {
    fuelPricesGbpPerKwh: a(
      { gas: 0.07, oil: 0.07, lpg: 0.09, electric: 0.25, heat_pump: 0.25, biomass: 0.06, district_heat: 0.09 },
      '£/kWh',
      'Energy prices by heating fuel',
      'Illustrative prices (domain reference example 7: gas £0.07, electricity £0.25)',
      'from_memory',
      F,
      { flagged: true, note: 'Illustrative: enter the trust’s contract prices.' },
    ),
    electricityPriceGbpPerKwh: a(0.25, '£/kWh', 'Electricity price (fans)', 'Illustrative (domain reference example 7)', 'from_memory', F, { flagged: true }),
    carbonFactorsKgCo2ePerKwh: a(
      { gas: 0.183, oil: 0.2468, lpg: 0.2145, electric: 0.207, heat_pump: 0.207, biomass: 0.0115, district_heat: 0.17 },
      'kgCO2e/kWh',
      'Carbon factors by heating fuel',
      'DESNZ greenhouse-gas conversion factors: gas ≈ 0.183 and electricity 0.207 (2024, secondary); oil, LPG, biomass, district heat recalled',
      'secondary',
      F,
    ),
    electricityKgCo2ePerKwh: a(0.207, 'kgCO2e/kWh', 'Electricity carbon factor', 'DESNZ 2024 location-based generation factor 0.20705', 'secondary', F),
    discountRate: a(0.035, '-', 'Real discount rate', 'HM Treasury Green Book social time preference rate 3.5 % (years 0–30)', 'confirmed', F),
    appraisalYears: a(15, 'years', 'Appraisal period', 'Typical life of a decentralised ventilation unit', 'common_practice', F),
  },
  retrofit: {
    unitCatalogue: a(
      [
        { id: 'sill-60', name: 'Sill unit 60', nominalFlowLps: 60, heatRecoveryEfficiency: 0.75, specificFanPowerWPerLps: 1.0, installedCostGbp: 2800, annualMaintenanceGbp: 90, lifeYears: 15, soundDbA: 28 },
        { id: 'ceiling-100', name: 'Ceiling cassette 100', nominalFlowLps: 100, heatRecoveryEfficiency: 0.8, specificFanPowerWPerLps: 1.1, installedCostGbp: 4500, annualMaintenanceGbp: 140, lifeYears: 15, soundDbA: 31 },
        { id: 'wall-150', name: 'Wall unit 150', nominalFlowLps: 150, heatRecoveryEfficiency: 0.8, specificFanPowerWPerLps: 1.2, installedCostGbp: 5500, annualMaintenanceGbp: 150, lifeYears: 15, soundDbA: 33 },
        { id: 'wall-250', name: 'Wall unit 250', nominalFlowLps: 250, heatRecoveryEfficiency: 0.78, specificFanPowerWPerLps: 1.3, installedCostGbp: 7500, annualMaintenanceGbp: 180, lifeYears: 15, soundDbA: 36 },
      ],
      'table',
      'Generic unit catalogue',
      'Generic decentralised heat-recovery units: 70–90 % dry efficiency, SFP ≤ 1.6 W/(L/s) for local balanced units; costs recalled',
      'from_memory',
      T,
      { note: 'Installed cost and maintenance are financial fields; flows, efficiency, SFP and sound are technical.' },
    ),
    soundLimitDbA: a(40, 'dB(A)', 'Combined unit sound limit in a classroom', 'BB93 (2015) indoor ambient noise for refurbished classrooms 40 dB LAeq,30min, recalled', 'from_memory', T),
    maxUnitsPerRoom: a(6, 'units', 'Most units in one room', 'Wall space and disruption limit', 'common_practice', T),
    windowOpenFractionWithUnits: a(0, '-', 'Windows opened in the heating season once units run', 'Units supply the fresh air; windows stay shut in winter', 'common_practice', T),
  },
};
