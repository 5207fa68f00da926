import type { RoomFields } from './estate.schemas';

/** Database row → the room's register fields (nulls stay unknown). */
export function roomFieldsOf(r: {
  code: string;
  name: string;
  use: string | null;
  floor_area_m2: number;
  ceiling_height_m: number | null;
  pupils: number | null;
  adults: number | null;
  age_group: string | null;
  orientation_deg: number | null;
  glazing_area_m2: number | null;
  openable_area_m2: number | null;
  window_type: string | null;
  frame_material: string | null;
  glazing_g_value: number | null;
  ventilation_type: string | null;
  mechanical_supply_lps: number | null;
  winter_window_open_fraction: number | null;
  notes: string | null;
}): RoomFields {
  return {
    code: r.code,
    name: r.name,
    use: r.use as RoomFields['use'],
    floorAreaM2: r.floor_area_m2,
    ceilingHeightM: r.ceiling_height_m,
    pupils: r.pupils,
    adults: r.adults,
    ageGroup: r.age_group as RoomFields['ageGroup'],
    orientationDeg: r.orientation_deg,
    glazingAreaM2: r.glazing_area_m2,
    openableAreaM2: r.openable_area_m2,
    windowType: r.window_type as RoomFields['windowType'],
    frameMaterial: r.frame_material as RoomFields['frameMaterial'],
    glazingGValue: r.glazing_g_value,
    ventilationType: r.ventilation_type as RoomFields['ventilationType'],
    mechanicalSupplyLps: r.mechanical_supply_lps,
    winterWindowOpenFraction: r.winter_window_open_fraction,
    notes: r.notes,
  };
}
