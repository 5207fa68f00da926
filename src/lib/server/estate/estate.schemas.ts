import { z } from 'zod';
import { ROOM_USES, VENTILATION_TYPES } from '../../engine/vocabulary';

/** Sortable columns of the rooms list, as the API names them. */
export const ROOM_SORT_KEYS = [
  'code',
  'name',
  'school',
  'block',
  'use',
  'floorAreaM2',
  'pupils',
  'ventilationType',
  'openableAreaM2',
] as const;

/** GET /api/rooms query string. */
export const RoomListQuerySchema = z.object({
  page: z.coerce.number().int().min(1, 'page starts at 1').default(1),
  pageSize: z.coerce.number().int().min(1).max(200, 'pageSize can be at most 200').default(50),
  sort: z.enum(ROOM_SORT_KEYS, { message: `sort must be one of: ${ROOM_SORT_KEYS.join(', ')}` }).default('code'),
  dir: z.enum(['asc', 'desc'], { message: 'dir must be asc or desc' }).default('asc'),
  schoolId: z.uuid({ message: 'schoolId must be a school id' }).optional(),
  blockId: z.uuid({ message: 'blockId must be a block id' }).optional(),
  use: z.enum(ROOM_USES, { message: `use must be one of: ${ROOM_USES.join(', ')}` }).optional(),
  ventilationType: z
    .enum(VENTILATION_TYPES, { message: `ventilationType must be one of: ${VENTILATION_TYPES.join(', ')}` })
    .optional(),
  q: z.string().trim().max(100).optional(),
});
export type RoomListQuery = z.infer<typeof RoomListQuerySchema>;

/** A path parameter that must be one of our ids. */
export const IdParamSchema = z.uuid({ message: 'That is not a valid id.' });
