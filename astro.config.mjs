// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';
import { fileURLToPath } from 'node:url';

const STARTUP = fileURLToPath(new URL('./src/lib/server/startup.ts', import.meta.url));
const PARSE_WORKER = fileURLToPath(new URL('./src/lib/server/register/parse-worker.ts', import.meta.url));
const LOG_XLSX_WORKER = fileURLToPath(new URL('./src/lib/server/monitor-logs/xlsx-worker.ts', import.meta.url));

/**
 * The built server runs src/lib/server/startup.ts before the Node adapter listens: imported at the top of
 * the adapter's server module, it refuses an unsafe configuration, guards every request and starts the
 * assessment queue, whether the server is started by `npm start` or by `node dist/server/entry.mjs`.
 * It also emits the upload readers' worker threads as dist/server/register-parse-worker.mjs (register
 * previews) and dist/server/log-xlsx-worker.mjs (monitor-log workbooks).
 * @returns {import('vite').Plugin}
 */
function airtallyServer() {
  let ssr = false;
  return {
    name: 'airtally-server',
    apply: 'build',
    configResolved(config) {
      ssr = Boolean(config.build.ssr);
    },
    buildStart() {
      if (!ssr) return;
      this.emitFile({ type: 'chunk', id: PARSE_WORKER, fileName: 'register-parse-worker.mjs' });
      this.emitFile({ type: 'chunk', id: LOG_XLSX_WORKER, fileName: 'log-xlsx-worker.mjs' });
    },
    /** @param {string} code @param {string} id */
    transform(code, id) {
      if (!/@astrojs[\\/]node[\\/]dist[\\/]server\.js$/.test(id)) return null;
      return { code: `import ${JSON.stringify(STARTUP)};\n${code}`, map: null };
    },
  };
}

// Server-rendered app on the Node adapter; React only for interactive islands.
export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  outDir: process.env.AIRTALLY_DIST_DIR ?? './dist',
  server: { host: '127.0.0.1', port: Number(process.env.PORT ?? 4321) },
  // Astro rebuilds the request URL from the Host header only for allowed domains (otherwise it uses
  // "localhost" and its origin check refuses every form post). Loopback on any port, plus the public host.
  security: {
    checkOrigin: true,
    allowedDomains: [
      { hostname: '127.0.0.1' },
      { hostname: 'localhost' },
      ...(process.env.PUBLIC_ORIGIN ? [{ hostname: new URL(process.env.PUBLIC_ORIGIN).hostname }] : []),
    ],
  },
  vite: {
    plugins: [tailwindcss(), airtallyServer()],
    ssr: { external: ['pg', 'pg-boss', 'exceljs', 'nodemailer', 'stripe', 'pg-copy-streams', 'highs', 'pdfkit'] },
  },
});
