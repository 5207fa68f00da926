/** Request shapes of the monitor-log and measured-CO2 API. */
import { z } from 'zod';

const uuid = z.string().uuid('Must be a valid id.');

/** Query of an upload: the file's name and what to assume about its times and rooms. */
export const UploadQuerySchema = z.object({
  fileName: z
    .string({ error: 'Give the file name in the fileName query parameter (it tells .csv from .xlsx).' })
    .trim()
    .min(1, 'Give the file name in the fileName query parameter.')
    .max(255),
  timeBasis: z.enum(['auto', 'Europe/London', 'UTC']).default('auto'),
  schoolId: uuid.optional(),
});

/** Rooms chosen for sensors (null: leave the sensor out). */
export const MapSensorsSchema = z.object({
  sensors: z
    .array(z.object({ sensorId: uuid, roomId: uuid.nullable() }))
    .min(1, 'Choose a room (or none) for at least one sensor.')
    .max(2000),
});

/** Commit or cancel a previewed log. */
export const CommitLogSchema = z.object({
  action: z.enum(['commit', 'cancel'], { error: 'Say "commit" to import the readings or "cancel" to drop them.' }),
});

/** Re-analysis of every room with readings. */
export const AnalysisRequestSchema = z.object({}).strict();

/** The comparison list: the margin in ppm and where to look. */
export const ComparisonQuerySchema = z.object({
  marginPpm: z.coerce.number().int().min(50).max(2000).default(200),
  schoolId: uuid.optional(),
});

/** A room's measured days for the chart: a date range (at most 62 days). */
export const RoomDaysQuerySchema = z.object({
  from: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, 'from must be a date like 2026-01-05')
    .optional(),
  to: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, 'to must be a date like 2026-01-31')
    .optional(),
});
