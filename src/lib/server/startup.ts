/**
 * Runs once when the built server starts, before it listens (astro.config.mjs imports this module at the
 * top of the Node adapter's server module): refuses to start with an unsafe configuration, guards every
 * request, starts the assessment queue so runs left behind by a dead worker are resumed or failed, and removes the
 * temporary folders of uploads a stopped server was reading.
 */
import { ZodError } from 'zod';
import { startQueueOnBoot } from './assessments/queue';
import { config, configProblems } from './config';
import { installRequestGuard } from './http/request-guard';
import { sweepStaleFolders } from './register/temp-folders';

function startupProblems(): string[] {
  try {
    return configProblems(config());
  } catch (error) {
    if (error instanceof ZodError) return error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    throw error;
  }
}

const problems = startupProblems();
if (problems.length > 0) {
  console.error(`Airtally will not start:\n${problems.map((p) => `  - ${p}`).join('\n')}`);
  process.exit(1);
}
installRequestGuard(config().auth.trustProxy);
startQueueOnBoot();
sweepStaleFolders().catch((error: unknown) => console.error('Removing stale upload folders failed', error));
