/**
 * Matching a log's sensors to rooms: a mapping the trust set before wins; otherwise the sensor's name is the
 * room code ("G12"), or holds it as a word ("Oakfield G12 monitor") together with the school's name or
 * reference when codes repeat across schools. Only rooms the member may see take part.
 */

/** A room a sensor may be matched to. */
export interface RoomRef {
  id: string;
  code: string;
  schoolId: string;
  schoolName: string;
  schoolReference: string | null;
}

/** How a sensor was matched. */
export interface SensorMatch {
  match: 'room_code' | 'remembered' | 'unmatched' | 'ambiguous';
  roomId: string | null;
  /** Rooms the name could mean when it is ambiguous (at most 10). */
  candidates: { roomId: string; code: string; schoolId: string; schoolName: string }[];
}

/** The form a sensor name or room code is compared in: lower case letters and digits only. */
export const normalKey = (text: string) => text.toLowerCase().replace(/[^a-z0-9]/g, '');

/** Indexes the rooms in scope by their normalised code. */
export function indexRooms(rooms: readonly RoomRef[]): Map<string, RoomRef[]> {
  const byCode = new Map<string, RoomRef[]>();
  for (const r of rooms) {
    const key = normalKey(r.code);
    if (!key) continue;
    const list = byCode.get(key) ?? [];
    list.push(r);
    byCode.set(key, list);
  }
  return byCode;
}

function schoolNamed(key: string, room: RoomRef): boolean {
  const k = normalKey(key);
  if (
    room.schoolReference &&
    normalKey(room.schoolReference).length >= 3 &&
    k.includes(normalKey(room.schoolReference))
  )
    return true;
  const firstWord = normalKey(room.schoolName.split(/\s+/)[0] ?? '');
  return firstWord.length >= 4 && k.includes(firstWord);
}

/** Matches one sensor name. */
export function matchSensor(
  sensorKey: string,
  byCode: Map<string, RoomRef[]>,
  remembered: Map<string, string>,
  inScope: Set<string>,
): SensorMatch {
  const key = normalKey(sensorKey);
  const saved = remembered.get(key);
  if (saved && inScope.has(saved)) return { match: 'remembered', roomId: saved, candidates: [] };
  let candidates = byCode.get(key) ?? [];
  if (candidates.length === 0) {
    const tokens = new Set(
      sensorKey
        .split(/[^A-Za-z0-9]+/)
        .map(normalKey)
        .filter((t) => t.length >= 2),
    );
    // "Room G 12" → also try adjacent tokens joined.
    const parts = sensorKey.split(/[^A-Za-z0-9]+/).filter(Boolean);
    for (let i = 0; i + 1 < parts.length; i++) tokens.add(normalKey(`${parts[i]}${parts[i + 1]}`));
    const found = new Map<string, RoomRef>();
    for (const t of tokens) for (const r of byCode.get(t) ?? []) found.set(r.id, r);
    candidates = [...found.values()];
  }
  if (candidates.length > 1) {
    const named = candidates.filter((r) => schoolNamed(sensorKey, r));
    if (named.length >= 1) candidates = named;
  }
  if (candidates.length === 1) return { match: 'room_code', roomId: candidates[0]!.id, candidates: [] };
  if (candidates.length === 0) return { match: 'unmatched', roomId: null, candidates: [] };
  return {
    match: 'ambiguous',
    roomId: null,
    candidates: candidates
      .slice(0, 10)
      .map((r) => ({ roomId: r.id, code: r.code, schoolId: r.schoolId, schoolName: r.schoolName })),
  };
}
