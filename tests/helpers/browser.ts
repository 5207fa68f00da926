// Chromium for browser tests: Debian's /usr/bin/chromium driven by playwright-core.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { APP_URL, DEMO_PASSWORD } from './session';

const FLAGS = [
  '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
];

/** A fresh Chromium profile in a temporary folder; closing the context deletes the folder. */
export async function launchBrowser(): Promise<BrowserContext> {
  const userDataDir = mkdtempSync(join(tmpdir(), 'airtally-chromium-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: FLAGS,
    baseURL: APP_URL,
    viewport: { width: 1280, height: 900 },
  });
  // Chromium may still be flushing its cache when 'close' fires: retry, and never fail a test over a temp folder.
  context.on('close', () => {
    try {
      rmSync(userDataDir, { recursive: true, force: true, maxRetries: 5, retryDelay: 200 });
    } catch {
      /* the OS cleans /tmp; a leftover profile folder is harmless */
    }
  });
  return context;
}

/** Signs in through the sign-in page and waits until the app has loaded. */
export async function signInInBrowser(page: Page, email: string, password: string = DEMO_PASSWORD): Promise<void> {
  await page.goto(`${APP_URL}/sign-in`);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await Promise.all([
    page.waitForURL((url) => url.pathname.startsWith('/app')),
    page.getByRole('button', { name: 'Sign in' }).click(),
  ]);
}
