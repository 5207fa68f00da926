/**
 * Worker threads the build emits next to the server's chunks (see astro.config.mjs), and a limit on how
 * many run at once. Running from source (development, unit tests) there is no built file: callers then
 * do the work in their own thread.
 */
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { config } from '../config';

const found = new Map<string, URL | null>();

/**
 * The built worker `fileName` (e.g. "register-parse-worker.mjs"), or null when running from source (unless the
 * configuration names the build's folder).
 */
export function findBuiltWorker(fileName: string): URL | null {
  const known = found.get(fileName);
  if (known !== undefined) return known;
  let url: URL | null = null;
  const named = config().builtWorkersDir;
  if (named) {
    const file = join(named, fileName);
    if (!existsSync(file)) throw new Error(`AIRTALLY_BUILT_WORKERS_DIR has no ${fileName} (${file})`);
    url = pathToFileURL(file);
  }
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let up = 0; up < 4 && !url; up++, dir = dirname(dir)) {
    const candidate = join(dir, fileName);
    if (existsSync(candidate)) {
      url = pathToFileURL(candidate);
      break;
    }
  }
  found.set(fileName, url);
  return url;
}

/** At most `size` pieces of work at once; the others wait their turn in order. */
export class Slots {
  private busy = 0;
  private readonly waiting: (() => void)[] = [];
  constructor(private readonly size: number) {}

  /** Waits for a free slot and returns the function that frees it (call it exactly once). */
  async take(): Promise<() => void> {
    if (this.busy >= this.size) await new Promise<void>((resolve) => this.waiting.push(resolve));
    this.busy++;
    let freed = false;
    return () => {
      if (freed) return;
      freed = true;
      this.busy--;
      this.waiting.shift()?.();
    };
  }

  async run<T>(work: () => Promise<T>): Promise<T> {
    const free = await this.take();
    try {
      return await work();
    } finally {
      free();
    }
  }
}

/**
 * Files read at once across every reader (register previews and monitor logs): two cores, so more
 * would only slow each other and the requests around them.
 */
export const FILE_READ_SLOTS = new Slots(2);

/**
 * Young generation of a file reader's heap (a worker's resourceLimits.maxYoungGenerationSizeMb). A worker thread gets a
 * far smaller one than the main thread by default, and a spreadsheet read makes many short-lived objects. Previews of a
 * 100,000-row register in the built reader, each after its warm-up (three rounds, 2026-12-04, Node 20): 3.7-4.7 s with
 * the default, 3.6-3.8 s with 64 MB, 3.1-3.2 s with 128 MB, 3.3-3.4 s with 256 MB.
 */
export const READER_YOUNG_GENERATION_MB = 128;
