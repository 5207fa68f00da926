/**
 * A school's own timetable: stored as the engine's TimetableSegment list, edited as plain lines such as
 * "08:50-10:00 lesson". Runs use it for the CO2 day and for the hours behind every energy figure.
 */
import { z } from 'zod';
import type { TimetableSegment } from '../../engine';

const KINDS = ['lesson', 'break', 'lunch', 'empty'] as const;

const toMinute = (hhmm: string) => {
  const [h, m] = hhmm.split(':').map(Number);
  return (h ?? 0) * 60 + (m ?? 0);
};
const toClock = (minute: number) =>
  `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(minute % 60).padStart(2, '0')}`;

/** One line of the editor: "HH:MM-HH:MM kind [label]". */
const LINE = /^([01]\d|2[0-3]):([0-5]\d)\s*[-–]\s*([01]\d|2[0-4]):([0-5]\d)\s+(lesson|break|lunch|empty)\b\s*(.*)$/i;

/** A timetable as text lines → segments, or a list of problems a person can act on. */
export const TimetableTextSchema = z
  .string()
  .max(2000)
  .transform((text, ctx): TimetableSegment[] | null => {
    const lines = text
      .split(/\r?\n/)
      .map((l) => l.trim())
      .filter(Boolean);
    if (lines.length === 0) return null;
    const segments: TimetableSegment[] = [];
    for (const [i, line] of lines.entries()) {
      const m = LINE.exec(line);
      if (!m) {
        ctx.addIssue({
          code: 'custom',
          message: `Line ${i + 1} "${line}" should read like "09:00-10:00 lesson" (lesson, break, lunch or empty).`,
        });
        return z.NEVER;
      }
      const start = toMinute(`${m[1]}:${m[2]}`);
      const end = toMinute(`${m[3]}:${m[4]}`);
      const kind = (m[5] ?? 'lesson').toLowerCase() as TimetableSegment['kind'];
      const previous = segments[segments.length - 1];
      if (end <= start || (previous && previous.endMinute !== start)) {
        ctx.addIssue({
          code: 'custom',
          message: `Line ${i + 1}: each period must end after it starts and start when the one before ends.`,
        });
        return z.NEVER;
      }
      segments.push({
        label:
          (m[6] ?? '').trim() ||
          (kind === 'lesson' ? `Lesson ${segments.filter((s) => s.kind === 'lesson').length + 1}` : kind),
        kind,
        startMinute: start,
        endMinute: end,
        occupancyFraction: kind === 'lesson' ? 1 : 0,
      });
    }
    return segments;
  });

/** A stored timetable (jsonb) as engine segments, or null when there is none or it is not one. */
export function parseStoredTimetable(value: unknown): readonly TimetableSegment[] | null {
  if (!Array.isArray(value) || value.length === 0) return null;
  const ok = value.every(
    (s) =>
      s &&
      typeof s === 'object' &&
      typeof s.startMinute === 'number' &&
      typeof s.endMinute === 'number' &&
      typeof s.occupancyFraction === 'number' &&
      KINDS.includes(s.kind),
  );
  return ok ? (value as TimetableSegment[]) : null;
}

/** Segments → the editor's lines. */
export function timetableText(segments: readonly TimetableSegment[] | null): string {
  if (!segments) return '';
  return segments
    .map((s) => `${toClock(s.startMinute)}-${toClock(s.endMinute)} ${s.kind} ${s.label}`.trim())
    .join('\n');
}
