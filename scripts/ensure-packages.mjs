// Installs the npm packages when they are missing or older than package-lock.json (used by .ci/run before the
// type-check and linter, which need them; `npm start` and `npm test` do the same themselves).
import { ensureNodeModules } from './lib/services.mjs';

ensureNodeModules();
