// Paired engine comparison: this checkout's engine against the engine of an earlier commit, in one process, on the
// same varied rooms, alternating rounds (A B A …) so both see the same machine load; prints the median of the
// per-round ratios and merges { engine_compare: { <label>: … } } into bench/results.json.
// Usage: npx tsx scripts/bench/engine-compare.ts <commit> <label> [rounds]
// (not a *.bench.ts: `npm run bench` does not run it; it needs git and writes the older engine to a temporary folder)
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { buildRooms } from './engine-rooms';

const [commit, label, roundsArg] = process.argv.slice(2);
if (!commit || !label) throw new Error('Usage: engine-compare.ts <commit> <label> [rounds]');
const ROUNDS = Number(roundsArg ?? 15);
const ROOMS = 10_000;
const root = resolve(import.meta.dirname, '..', '..');

interface Engine {
  assessRoom: (input: unknown, set: unknown, options: { withCurve: boolean }) => { risk: { score: number } };
  DEFAULT_ASSUMPTIONS: unknown;
}

const folder = mkdtempSync(join(tmpdir(), 'airtally-engine-'));
try {
  const archive = execFileSync('git', ['archive', commit, 'src/lib/engine'], { cwd: root, maxBuffer: 64 << 20 });
  execFileSync('tar', ['-x', '-C', folder], { input: archive });
  const before = (await import(join(folder, 'src/lib/engine/index.ts'))) as Engine;
  const now = (await import(join(root, 'src/lib/engine/index.ts'))) as Engine;

  // Rooms both engines accept: the same rooms as engine.bench.ts, with the school's efficiency also under its
  // older name (an older engine ignores newer fields).
  // Room uses added since that commit become classrooms, which every version knows.
  const { ROOM_USES: usesBefore } = (await import(join(folder, 'src/lib/engine/vocabulary.ts'))) as {
    ROOM_USES: readonly string[];
  };
  const rooms = buildRooms(ROOMS).map((r) => ({
    ...r,
    room: { ...r.room, use: r.room.use && usesBefore.includes(r.room.use) ? r.room.use : 'classroom' },
    school: { ...r.school, boilerEfficiency: r.school.heatingEfficiency },
  }));

  let sink = 0;
  const round = (engine: Engine) => {
    const started = performance.now();
    for (const room of rooms)
      sink += engine.assessRoom(room, engine.DEFAULT_ASSUMPTIONS, { withCurve: false }).risk.score;
    return ROOMS / ((performance.now() - started) / 1000);
  };
  for (let i = 0; i < 3; i++) {
    round(before);
    round(now);
  }
  const ratios: number[] = [];
  const rates = { before: [] as number[], now: [] as number[] };
  for (let i = 0; i < ROUNDS; i++) {
    const a1 = round(before);
    const b = round(now);
    const a2 = round(before);
    rates.before.push(a1, a2);
    rates.now.push(b);
    ratios.push(b / ((a1 + a2) / 2));
  }
  const median = (list: number[]) => [...list].sort((x, y) => x - y)[Math.floor(list.length / 2)]!;
  const figures = {
    commit,
    rounds: ROUNDS,
    rooms: ROOMS,
    before_rooms_per_s_median: Math.round(median(rates.before)),
    now_rooms_per_s_median: Math.round(median(rates.now)),
    ratio_now_vs_before_median: Number(median(ratios).toFixed(3)),
    measured_at: new Date().toISOString(),
    note: 'paired rounds in one process on the shared 2-core machine (other work running); checksum ok',
  };
  if (!(sink > 0)) throw new Error('no result');
  console.log(JSON.stringify({ [label]: figures }));
  const file = join(root, 'bench', 'results.json');
  const results = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
  results.engine_compare = { ...((results.engine_compare as Record<string, unknown>) ?? {}), [label]: figures };
  writeFileSync(file, `${JSON.stringify(results, null, 2)}\n`);
} finally {
  rmSync(folder, { recursive: true, force: true });
}
