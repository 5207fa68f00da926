/** Adding, changing and removing schools from the estate pages. */
import type { SchoolRemovalImpact } from '../server/estate/schools.repository';
import { apiFetch } from './api';

/** A school's attributes as the estate forms send them (prices in £/kWh, as the API takes them). */
export interface SchoolInput {
  name: string;
  referenceNumber: string | null;
  phase: string;
  climateRegion: string;
  address: string | null;
  heatingFuel: string;
  fuelPriceGbpPerKwh: number | null;
  heatingEfficiency: number | null;
  /** The school day, one period a line ("09:00-10:00 lesson"); blank: the trust's timetable. */
  timetable: string;
}

/** Adds a school; answers its id. */
export async function addSchool(input: SchoolInput): Promise<string> {
  const { school } = await apiFetch<{ school: { id: string } }>('/api/schools', { method: 'POST', body: input });
  return school.id;
}

/** Changes a school's attributes. */
export function changeSchool(id: string, input: Partial<SchoolInput>): Promise<unknown> {
  return apiFetch(`/api/schools/${id}`, { method: 'PATCH', body: input });
}

/** Sets the year a block's heating plant was installed (null: unknown). */
export function changeBlockPlantYear(id: string, heatingInstalledYear: number | null): Promise<unknown> {
  return apiFetch(`/api/blocks/${id}`, { method: 'PATCH', body: { heatingInstalledYear } });
}

/** What removing a school would take with it. */
export async function schoolRemoval(
  id: string,
): Promise<SchoolRemovalImpact & { name: string; subscriptionChange: string | null }> {
  const answer = await apiFetch<{ removal: SchoolRemovalImpact & { name: string }; subscriptionChange: string | null }>(
    `/api/schools/${id}/removal`,
  );
  return { ...answer.removal, subscriptionChange: answer.subscriptionChange };
}

/** Removes a school with its blocks, rooms and results. */
export function removeSchool(id: string): Promise<unknown> {
  return apiFetch(`/api/schools/${id}`, { method: 'DELETE' });
}
