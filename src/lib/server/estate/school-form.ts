/** The choices the school forms offer, with the words people read (serialisable props for the island). */
import { CLIMATE_REGIONS, HEATING_FUELS, label, SCHOOL_PHASES } from '../../engine/vocabulary';

const options = (codes: readonly string[]) => codes.map((value) => ({ value, label: label(value) }));

/** Phases, climate regions and heating fuels as options. */
export const schoolFormOptions = () => ({
  phases: options(SCHOOL_PHASES),
  climateRegions: options(CLIMATE_REGIONS),
  heatingFuels: options(HEATING_FUELS),
});
