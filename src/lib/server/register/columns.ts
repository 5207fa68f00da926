import { BLOCK_LIMITS, type FieldLimit, ROOM_LIMITS, SCHOOL_LIMITS } from '../../engine/limits';
import {
  AGE_GROUPS,
  FRAME_MATERIALS,
  HEATING_FUELS,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from '../../engine/vocabulary';

/** How a register column's cell text becomes a value. */
export type ColumnKind = 'text' | 'number' | 'integer' | 'year' | 'orientation' | 'enum';

/** What a number's unit measures, so typed units ("60 m2", "2700 mm") can be converted. */
export type Quantity = 'area' | 'length' | 'flow' | 'count' | 'permeability' | 'price' | 'ratio' | 'percent';

/** One column of the room register, as the template writes it and the import reads it. */
export interface RegisterColumn {
  field: RegisterField;
  header: string;
  kind: ColumnKind;
  quantity?: Quantity;
  values?: readonly string[];
  /** Header texts (normalised, see headerKey) that mean this column. */
  synonyms: readonly string[];
  /** Column width in the template, in characters. */
  width: number;
  /** Excel number format for numeric columns. */
  numFmt?: string;
  /** The field's range (limits.ts), for the template's data validation; `sheetScale` converts it to the sheet's unit. */
  limit?: FieldLimit;
  sheetScale?: number;
  guide: string;
}

export const REGISTER_FIELDS = [
  'school',
  'schoolPhase',
  'block',
  'yearBuilt',
  'code',
  'name',
  'use',
  'floorAreaM2',
  'ceilingHeightM',
  'pupils',
  'adults',
  'ageGroup',
  'orientationDeg',
  'glazingAreaM2',
  'openableAreaM2',
  'windowType',
  'ventilationType',
  'mechanicalSupplyLps',
  'airPermeabilityM3hM2',
  'glazingGValue',
  'frameMaterial',
  'winterWindowOpenFraction',
  'schoolHeatingFuel',
  'schoolFuelPriceGbpPerKwh',
  'schoolHeatingEfficiency',
  'blockHeatingFuel',
  'blockFuelPriceGbpPerKwh',
  'blockHeatingEfficiency',
  'notes',
  'schoolPostcode',
] as const;
export type RegisterField = (typeof REGISTER_FIELDS)[number];

/** The register's columns in template order (headers as in the product brief). */
export const REGISTER_COLUMNS: readonly RegisterColumn[] = [
  {
    field: 'school',
    header: 'School',
    kind: 'text',
    width: 30,
    synonyms: ['school', 'school name', 'site', 'site name', 'academy', 'establishment', 'school site'],
    guide:
      'The school the room belongs to, written the same way on every row. A name Airtally does not know yet creates a new school.',
  },
  {
    field: 'schoolPhase',
    header: 'School phase',
    kind: 'enum',
    values: SCHOOL_PHASES,
    width: 16,
    synonyms: ['school phase', 'phase', 'phase of education', 'school type'],
    guide:
      'Optional. For a school Airtally does not know yet it is read from the name where it says (Primary, Infant, High School, Sixth Form College…) or asked once in the preview; for a known school it updates its phase.',
  },
  {
    field: 'block',
    header: 'Block',
    kind: 'text',
    width: 24,
    synonyms: ['block', 'block name', 'building', 'building name'],
    guide: 'The building on the site. Leave blank if the school has one building or you do not know.',
  },
  {
    field: 'yearBuilt',
    limit: BLOCK_LIMITS.yearBuilt,
    header: 'Year built',
    kind: 'year',
    width: 11,
    numFmt: '0',
    synonyms: [
      'year built',
      'built',
      'construction year',
      'year of construction',
      'date built',
      'build year',
      'block year built',
    ],
    guide: 'The year the block was built, e.g. 1968. Applies to the whole block.',
  },
  {
    field: 'code',
    header: 'Room code',
    kind: 'text',
    width: 12,
    synonyms: [
      'room code',
      'room',
      'room no',
      'room number',
      'room ref',
      'room reference',
      'room id',
      'code',
      'ref',
      'space code',
      'space ref',
    ],
    guide: "The room's code, unique within its school (e.g. G12). Airtally matches rooms by school and room code.",
  },
  {
    field: 'name',
    header: 'Room name',
    kind: 'text',
    width: 24,
    synonyms: ['room name', 'name', 'description', 'room description', 'space name'],
    guide: 'A name people recognise, e.g. "Year 4 classroom".',
  },
  {
    field: 'use',
    header: 'Room use',
    kind: 'enum',
    values: ROOM_USES,
    width: 18,
    synonyms: ['room use', 'use', 'room type', 'usage', 'function', 'space type', 'activity'],
    guide: 'What the room is used for. Pick from the list.',
  },
  {
    field: 'floorAreaM2',
    limit: ROOM_LIMITS.floorAreaM2,
    header: 'Floor area (m2)',
    kind: 'number',
    quantity: 'area',
    width: 15,
    numFmt: '0.0',
    synonyms: ['floor area', 'area', 'gia', 'nia', 'room area', 'net area', 'floor space', 'internal area'],
    guide: 'Floor area in square metres, 1 to 5,000.',
  },
  {
    field: 'ceilingHeightM',
    limit: ROOM_LIMITS.ceilingHeightM,
    header: 'Ceiling height (m)',
    kind: 'number',
    quantity: 'length',
    width: 17,
    numFmt: '0.00',
    synonyms: ['ceiling height', 'height', 'room height', 'floor to ceiling', 'floor to ceiling height'],
    guide: 'Average floor-to-ceiling height in metres, between 2 and 12.',
  },
  {
    field: 'pupils',
    limit: ROOM_LIMITS.pupils,
    header: 'Pupils',
    kind: 'integer',
    quantity: 'count',
    width: 9,
    numFmt: '0',
    synonyms: [
      'pupils',
      'pupil numbers',
      'number of pupils',
      'no of pupils',
      'students',
      'pupil capacity',
      'capacity',
      'occupancy',
      'design occupancy',
    ],
    guide:
      'How many pupils the room is designed for (a whole number). Leave blank if not known: Airtally assumes a number from the floor area and says so.',
  },
  {
    field: 'adults',
    limit: ROOM_LIMITS.adults,
    header: 'Adults',
    kind: 'integer',
    quantity: 'count',
    width: 9,
    numFmt: '0',
    synonyms: ['adults', 'staff', 'teachers', 'number of adults', 'no of adults'],
    guide: 'Teachers and support staff usually in the room (a whole number).',
  },
  {
    field: 'ageGroup',
    header: 'Age group',
    kind: 'enum',
    values: AGE_GROUPS,
    width: 18,
    synonyms: ['age group', 'age', 'key stage', 'year group', 'age range'],
    guide: 'The age of the pupils, which sets how much CO2 they breathe out. Blank takes it from the school phase.',
  },
  {
    field: 'orientationDeg',
    header: 'Orientation',
    kind: 'orientation',
    width: 13,
    synonyms: ['orientation', 'facing', 'aspect', 'window orientation', 'bearing', 'direction', 'window facing'],
    guide:
      'The way the main windows face: a compass point (N, SW, south-west) or a bearing in degrees (0 = north, 90 = east).',
  },
  {
    field: 'glazingAreaM2',
    limit: ROOM_LIMITS.glazingAreaM2,
    header: 'Glazing area (m2)',
    kind: 'number',
    quantity: 'area',
    width: 17,
    numFmt: '0.00',
    synonyms: ['glazing area', 'glazing', 'window area', 'glazed area', 'area of glazing'],
    guide: 'Total window glass area in square metres.',
  },
  {
    field: 'openableAreaM2',
    limit: ROOM_LIMITS.openableAreaM2,
    header: 'Openable area (m2)',
    kind: 'number',
    quantity: 'area',
    width: 18,
    numFmt: '0.00',
    synonyms: [
      'openable area',
      'openable window area',
      'free area',
      'opening area',
      'openable',
      'free opening area',
      'openable window',
    ],
    guide: 'The area that opens for fresh air, in square metres. It cannot be more than the glazing area.',
  },
  {
    field: 'windowType',
    header: 'Window type',
    kind: 'enum',
    values: WINDOW_TYPES,
    width: 20,
    synonyms: ['window type', 'window', 'windows', 'window style', 'opening type', 'window opening type'],
    guide: 'How the windows open. Pick from the list.',
  },
  {
    field: 'ventilationType',
    header: 'Ventilation type',
    kind: 'enum',
    values: VENTILATION_TYPES,
    width: 26,
    synonyms: ['ventilation type', 'ventilation', 'vent type', 'ventilation strategy', 'ventilation system', 'vent'],
    guide: 'How the room is ventilated today. Pick from the list; blank is read as natural, single-sided.',
  },
  {
    field: 'mechanicalSupplyLps',
    limit: ROOM_LIMITS.mechanicalSupplyLps,
    header: 'Mechanical supply (l/s)',
    kind: 'number',
    quantity: 'flow',
    width: 21,
    numFmt: '0',
    synonyms: [
      'mechanical supply',
      'supply air',
      'supply rate',
      'mech supply',
      'supply flow',
      'mechanical ventilation rate',
      'supply air flow',
      'supply',
    ],
    guide:
      'Fresh air supplied by fans, in litres per second, if the room has a mechanical system. Leave blank if not known.',
  },
  {
    field: 'airPermeabilityM3hM2',
    limit: BLOCK_LIMITS.airPermeabilityM3hM2,
    header: 'Air permeability (m3/h.m2 @ 50 Pa)',
    kind: 'number',
    quantity: 'permeability',
    width: 30,
    numFmt: '0.0',
    synonyms: ['air permeability', 'permeability', 'air tightness', 'airtightness', 'q50', 'air leakage'],
    guide:
      "The block's air-tightness test result in m³ per hour per m² of envelope at 50 Pa. Applies to the whole block.",
  },
  {
    field: 'glazingGValue',
    limit: ROOM_LIMITS.glazingGValue,
    header: 'Glazing g-value',
    kind: 'number',
    quantity: 'ratio',
    width: 15,
    numFmt: '0.00',
    synonyms: ['glazing g value', 'g value', 'g-value', 'solar transmittance', 'g'],
    guide: 'Total solar energy transmittance of the glass, 0.1 to 0.9 (double glazing about 0.6). Blank: assumed.',
  },
  {
    field: 'frameMaterial',
    header: 'Window frame',
    kind: 'enum',
    values: FRAME_MATERIALS,
    width: 18,
    synonyms: ['window frame', 'frame', 'frame material', 'frame type', 'window frame material'],
    guide: 'What the window frames are made of (sets how much of the window is glass). Pick from the list.',
  },
  {
    field: 'winterWindowOpenFraction',
    limit: ROOM_LIMITS.winterWindowOpenFraction,
    sheetScale: 100,
    header: 'Winter window opening (%)',
    kind: 'number',
    quantity: 'percent',
    width: 24,
    numFmt: '0',
    synonyms: ['winter window opening', 'window opening winter', 'winter opening', 'windows open in winter'],
    guide:
      'How far the windows are usually open in winter while pupils are in, as a percentage of the openable area (0 = kept shut). Blank: the assumption set’s winter figure.',
  },
  {
    field: 'schoolHeatingFuel',
    header: 'School heating fuel',
    kind: 'enum',
    values: HEATING_FUELS,
    width: 18,
    synonyms: ['school heating fuel', 'school fuel', 'site fuel', 'site heating fuel'],
    guide: "The fuel of the school's main heating. Applies to the whole school.",
  },
  {
    field: 'schoolFuelPriceGbpPerKwh',
    limit: SCHOOL_LIMITS.fuelPriceGbpPerKwh,
    header: 'School fuel price (£/kWh)',
    kind: 'number',
    quantity: 'price',
    width: 22,
    numFmt: '"£"0.000',
    synonyms: ['school fuel price', 'school energy price', 'fuel price', 'site fuel price'],
    guide: "The school's own contract price for its heating fuel, £ per kWh. Blank: the trust's price (assumptions).",
  },
  {
    field: 'schoolHeatingEfficiency',
    header: 'School heating efficiency',
    kind: 'number',
    quantity: 'ratio',
    width: 22,
    numFmt: '0.00',
    synonyms: ['school heating efficiency', 'boiler efficiency', 'school boiler efficiency', 'heating efficiency'],
    guide:
      'Seasonal efficiency of the school’s heating: boilers 0.3–1 (e.g. 0.85), direct electric 1, heat pumps their seasonal COP (1–6). Blank: the trust’s default.',
  },
  {
    field: 'blockHeatingFuel',
    header: 'Block heating fuel',
    kind: 'enum',
    values: HEATING_FUELS,
    width: 18,
    synonyms: ['block heating fuel', 'block fuel', 'building fuel', 'building heating fuel'],
    guide: "The block's own heating fuel where it differs from the school's (e.g. an electric nursery pod).",
  },
  {
    field: 'blockFuelPriceGbpPerKwh',
    limit: BLOCK_LIMITS.fuelPriceGbpPerKwh,
    header: 'Block fuel price (£/kWh)',
    kind: 'number',
    quantity: 'price',
    width: 22,
    numFmt: '"£"0.000',
    synonyms: ['block fuel price', 'building fuel price', 'block energy price'],
    guide: "The block's own price for its heating fuel. Blank: the school's (same fuel), else the trust's.",
  },
  {
    field: 'blockHeatingEfficiency',
    header: 'Block heating efficiency',
    kind: 'number',
    quantity: 'ratio',
    width: 22,
    numFmt: '0.00',
    synonyms: ['block heating efficiency', 'building heating efficiency', 'block boiler efficiency'],
    guide:
      "Seasonal efficiency of the block's own heating (heat pumps: seasonal COP). Blank: the school's, else the trust's.",
  },
  {
    field: 'notes',
    header: 'Notes',
    kind: 'text',
    width: 40,
    synonyms: ['notes', 'note', 'comments', 'comment', 'remarks'],
    guide: 'Anything else worth keeping with the room.',
  },
  {
    field: 'schoolPostcode',
    header: 'School postcode',
    kind: 'text',
    width: 14,
    synonyms: ['school postcode', 'postcode', 'post code', 'site postcode', 'postal code'],
    guide:
      "Only read when the row creates a new school: its postcode area gives the school's climate region (kept as its address).",
  },
];

/** The column definition of a field. */
export function columnOf(field: RegisterField): RegisterColumn {
  const column = REGISTER_COLUMNS.find((c) => c.field === field);
  if (!column) throw new Error(`Unknown register field ${field}`);
  return column;
}
