/**
 * The estate vocabulary shared by the engine, the database, the register import and the UI.
 * Each list is the set of stored codes; `label` maps a code to the words a person reads.
 */

/** School phases as used in English school census returns. */
export const SCHOOL_PHASES = [
  'nursery',
  'primary',
  'secondary',
  'all_through',
  'special',
  'further_education',
] as const;
export type SchoolPhase = (typeof SCHOOL_PHASES)[number];

/**
 * What a room is used for; drives the default activity level and whether CO2 criteria apply. The spaces follow the
 * Department for Education's area guidelines (BB103 (2014) for mainstream and BB104 (2015) for SEND schools: basic
 * teaching incl. small group and SEN resource rooms, practical, halls and studios, dining, learning resources, staff
 * and administration; recalled, from memory).
 */
export const ROOM_USES = [
  'classroom',
  'science_lab',
  'practical',
  'ict_room',
  'music_room',
  'hall',
  'sports_hall',
  'library',
  'office',
  'staff_room',
  'sen_room',
  'group_room',
  'studio',
  'dining_room',
  'other',
] as const;
export type RoomUse = (typeof ROOM_USES)[number];

/** Pupil age groups, aligned with the age bands of Persily & de Jonge (2017) Table 4. */
export const AGE_GROUPS = ['early_years', 'primary', 'secondary', 'sixth_form', 'adult'] as const;
export type AgeGroup = (typeof AGE_GROUPS)[number];

/** Window opening types; each has a published or common-practice effective-opening factor in the engine. */
export const WINDOW_TYPES = [
  'side_hung',
  'top_hung',
  'bottom_hung',
  'sliding_sash',
  'tilt_and_turn',
  'pivot',
  'fixed',
] as const;
export type WindowType = (typeof WINDOW_TYPES)[number];

/** Window frame materials; each has a frame factor (glazed share of the window) in the assumption set. */
export const FRAME_MATERIALS = ['timber', 'pvc_u', 'metal', 'metal_thermal_break'] as const;
export type FrameMaterial = (typeof FRAME_MATERIALS)[number];

/** How a room is ventilated today. */
export const VENTILATION_TYPES = [
  'natural_single_sided',
  'natural_cross',
  'mechanical_extract',
  'mechanical_supply_extract',
  'heat_recovery_unit',
  'hybrid',
] as const;
export type VentilationType = (typeof VENTILATION_TYPES)[number];

/** Heating fuels; each has a carbon factor and a price in the assumption set. */
export const HEATING_FUELS = ['gas', 'oil', 'lpg', 'electric', 'heat_pump', 'biomass', 'district_heat'] as const;
export type HeatingFuel = (typeof HEATING_FUELS)[number];

/** Construction types of school blocks, broad enough for a survey spreadsheet. */
export const CONSTRUCTION_TYPES = [
  'solid_masonry',
  'cavity_masonry',
  'system_built',
  'timber_frame',
  'steel_frame',
  'concrete_frame',
  'modular',
] as const;
export type ConstructionType = (typeof CONSTRUCTION_TYPES)[number];

/**
 * The baselines a heat-recovery retrofit is appraised against: today's operation as registered, the same airflow
 * without heat recovery (windows or the existing fans), and the cheapest option that meets the criterion without
 * heat recovery.
 */
export const BASELINES = ['today', 'same_air_without_recovery', 'simpler_option'] as const;
export type BaselineId = (typeof BASELINES)[number];

/** What heat-recovery units do outside the heating season: run with the recovery bypassed, or stand off. */
export const SUMMER_MODES = ['bypass', 'off'] as const;
export type SummerMode = (typeof SUMMER_MODES)[number];

/** Heating emitter/plant types of a block. */
export const HEATING_TYPES = [
  'wet_radiators',
  'underfloor',
  'warm_air',
  'electric_panels',
  'heat_pump_wet',
  'none',
] as const;
export type HeatingType = (typeof HEATING_TYPES)[number];

/**
 * UK climate regions used to look up outdoor conditions (the engine owns the table of values).
 * Codes are our own; names are ordinary geographic regions.
 */
export const CLIMATE_REGIONS = [
  'london_south_east',
  'south_west',
  'east_anglia',
  'midlands',
  'north_west',
  'north_east',
  'wales',
  'scotland',
  'northern_ireland',
] as const;
export type ClimateRegion = (typeof CLIMATE_REGIONS)[number];

/** The eight compass points and their bearings in degrees from north. */
export const COMPASS_POINTS = { N: 0, NE: 45, E: 90, SE: 135, S: 180, SW: 225, W: 270, NW: 315 } as const;
export type CompassPoint = keyof typeof COMPASS_POINTS;

const LABELS: Record<string, string> = {
  nursery: 'Nursery',
  primary: 'Primary',
  secondary: 'Secondary',
  all_through: 'All-through',
  special: 'Special',
  further_education: 'Further education',
  classroom: 'Classroom',
  science_lab: 'Science lab',
  practical: 'Practical room',
  ict_room: 'ICT room',
  music_room: 'Music room',
  hall: 'Hall',
  sports_hall: 'Sports hall',
  library: 'Library',
  office: 'Office',
  staff_room: 'Staff room',
  sen_room: 'SEN / intervention room',
  group_room: 'Small group room',
  studio: 'Drama or dance studio',
  dining_room: 'Dining room',
  other: 'Other',
  early_years: 'Early years (3–5)',
  sixth_form: 'Sixth form (16–19)',
  adult: 'Adults',
  side_hung: 'Side-hung casement',
  top_hung: 'Top-hung casement',
  bottom_hung: 'Bottom-hung (hopper)',
  sliding_sash: 'Sliding sash',
  tilt_and_turn: 'Tilt and turn',
  pivot: 'Pivot',
  fixed: 'Fixed (not openable)',
  natural_single_sided: 'Natural, single-sided',
  natural_cross: 'Natural, cross-ventilated',
  mechanical_extract: 'Mechanical extract',
  mechanical_supply_extract: 'Mechanical supply and extract',
  heat_recovery_unit: 'Heat-recovery unit',
  hybrid: 'Hybrid',
  gas: 'Mains gas',
  oil: 'Heating oil',
  lpg: 'LPG',
  electric: 'Direct electric',
  heat_pump: 'Heat pump',
  biomass: 'Biomass',
  district_heat: 'District heat',
  solid_masonry: 'Solid masonry',
  cavity_masonry: 'Cavity masonry',
  system_built: 'System-built',
  timber_frame: 'Timber frame',
  steel_frame: 'Steel frame',
  concrete_frame: 'Concrete frame',
  modular: 'Modular',
  wet_radiators: 'Wet radiators',
  underfloor: 'Underfloor',
  warm_air: 'Warm air',
  electric_panels: 'Electric panels',
  heat_pump_wet: 'Heat pump (wet system)',
  none: 'None',
  timber: 'Timber',
  pvc_u: 'PVC-U',
  metal: 'Metal',
  metal_thermal_break: 'Metal, thermally broken',
  today: "today's operation",
  same_air_without_recovery: 'the same air without heat recovery',
  simpler_option: 'the cheapest compliant option without heat recovery',
  bypass: 'run with heat recovery bypassed',
  off: 'switched off (windows instead)',
  london_south_east: 'London and South East',
  south_west: 'South West',
  east_anglia: 'East of England',
  midlands: 'Midlands',
  north_west: 'North West',
  north_east: 'North East and Yorkshire',
  wales: 'Wales',
  scotland: 'Scotland',
  northern_ireland: 'Northern Ireland',
};

/** The words a person reads for a stored code; unknown codes come back unchanged. */
export function label(code: string): string {
  return LABELS[code] ?? code;
}
