import { z } from 'zod';
import { programmeNotFound } from './programme.errors';

/** The programme id of a route; anything that is not an id is simply not found. */
export function programmeId(value: string | undefined): string {
  const parsed = z.uuid().safeParse(value);
  if (!parsed.success) throw programmeNotFound();
  return parsed.data;
}
