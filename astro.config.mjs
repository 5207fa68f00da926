// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

// Server-rendered app on the Node adapter; React only for interactive islands.
export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  outDir: process.env.AIRTALLY_DIST_DIR ?? './dist',
  server: { host: '127.0.0.1', port: Number(process.env.PORT ?? 4321) },
  security: { checkOrigin: true },
  vite: {
    plugins: [tailwindcss()],
    ssr: { external: ['pg', 'pg-boss', 'exceljs', 'nodemailer', 'stripe', 'pg-copy-streams'] },
  },
});
