// Paired engine comparison: this checkout's engine against the engine of an earlier commit, in one process, on the
// same varied rooms, alternating rounds (A B A …) so both see the same machine load; prints the median of the
// per-round ratios and merges { engine_compare: { <label>: … } } into bench/results.json.
// Usage: npx tsx scripts/bench/engine-compare.ts <commit> <label> [rounds]
// (not a *.bench.ts: `npm run bench` does not run it; it needs git and writes the older engine to a temporary folder)
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { prng } from '../seed/prng';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  HEATING_FUELS,
  ROOM_USES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from '../../src/lib/engine/vocabulary';

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

  // Rooms both engines accept: the register fields of both versions (an older engine ignores newer fields).
  const rand = prng(20261201);
  const pick = <T>(list: readonly T[]) => list[Math.floor(rand() * list.length)] as T;
  const rooms = Array.from({ length: ROOMS }, (_, i) => {
    const floor = 30 + rand() * 90;
    const glazing = floor * (0.05 + rand() * 0.35);
    const ventilation = rand() < 0.75 ? pick(['natural_single_sided', 'natural_cross']) : pick(VENTILATION_TYPES);
    const heatingFuel = rand() < 0.85 ? 'gas' : pick(HEATING_FUELS);
    const boiler = rand() < 0.5 ? 0.7 + rand() * 0.2 : null;
    const efficiency =
      boiler === null ? null : heatingFuel === 'electric' ? 1 : heatingFuel === 'heat_pump' ? 4 * boiler : boiler;
    return {
      room: {
        code: `R${i}`,
        name: `Room ${i}`,
        use: rand() < 0.8 ? 'classroom' : pick(ROOM_USES),
        floorAreaM2: floor,
        ceilingHeightM: 2.4 + rand() * 1.2,
        pupils: Math.floor(10 + rand() * 25),
        adults: 1 + Math.floor(rand() * 2),
        ageGroup: pick(AGE_GROUPS.slice(0, 4)),
        orientationDeg: rand() < 0.9 ? Math.floor(rand() * 360) : null,
        glazingAreaM2: glazing,
        openableAreaM2: glazing * (0.05 + rand() * 0.3),
        windowType: pick(WINDOW_TYPES),
        glazingGValue: rand() < 0.5 ? 0.4 + rand() * 0.35 : null,
        ventilationType: ventilation,
        mechanicalSupplyLps: ventilation.startsWith('natural') || rand() < 0.5 ? null : 50 + rand() * 200,
        frameMaterial: null,
        winterWindowOpenFraction: null,
      },
      block: {
        yearBuilt: rand() < 0.9 ? 1900 + Math.floor(rand() * 125) : null,
        constructionType: rand() < 0.8 ? pick(CONSTRUCTION_TYPES) : null,
        airPermeabilityM3hM2: rand() < 0.3 ? 3 + rand() * 20 : null,
        // As in engine.bench.ts: one block in five has its own heating fuel.
        heatingFuel: rand() < 0.2 ? pick(HEATING_FUELS) : null,
        fuelPriceGbpPerKwh: null,
        heatingEfficiency: null,
        heatingInstalledYear: rand() < 0.7 ? 1980 + Math.floor(rand() * 45) : null,
      },
      school: {
        phase: rand() < 0.5 ? 'primary' : 'secondary',
        climateRegion: pick(CLIMATE_REGIONS),
        heatingFuel,
        fuelPriceGbpPerKwh: rand() < 0.5 ? 0.05 + rand() * 0.05 : null,
        heatingEfficiency: efficiency,
        boilerEfficiency: efficiency,
        timetable: null,
      },
    };
  });

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
