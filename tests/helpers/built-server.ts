// A second copy of the built server, started by a test with an environment of its own (the test stack's app keeps
// running beside it).
import { type ChildProcess, spawn } from 'node:child_process';
import { join } from 'node:path';

export interface BuiltServer {
  child: ChildProcess;
  /** Everything it has printed so far. */
  output: () => string;
  /** Stops it (SIGTERM) and waits for it to exit. */
  stop: () => Promise<void>;
}

/** Starts the built server (the test stack's build) with `env`. */
export function spawnBuiltServer(env: Record<string, string>): BuiltServer {
  const entry = join(process.env.APP_DIST_DIR ?? '', 'server', 'entry.mjs');
  const child = spawn(process.execPath, [entry], { env, stdio: ['ignore', 'pipe', 'pipe'] });
  let output = '';
  child.stdout?.on('data', (d: Buffer) => {
    output += d.toString();
  });
  child.stderr?.on('data', (d: Buffer) => {
    output += d.toString();
  });
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  return {
    child,
    output: () => output,
    stop: async () => {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
      await exited;
    },
  };
}

/** The test environment on a port of its own (`offset` from the test port), with `extra` over it. */
export function serverEnv(
  offset: number,
  extra: Record<string, string> = {},
  drop: string[] = [],
): Record<string, string> {
  const env: Record<string, string> = {};
  for (const [k, v] of Object.entries(process.env)) if (v !== undefined && !drop.includes(k)) env[k] = v;
  const port = String(Number(process.env.AIRTALLY_TEST_PORT ?? 4399) + offset);
  return { ...env, HOST: '127.0.0.1', PORT: port, PUBLIC_ORIGIN: `http://127.0.0.1:${port}`, ...extra };
}
