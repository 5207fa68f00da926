// Chromium for browser tests: Debian's /usr/bin/chromium driven by playwright-core.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { APP_URL, DEMO_PASSWORD, signIn } from './session';

const FLAGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
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

/**
 * A fresh browser signed in as `email`: the session cookie from the API goes into the context, so each
 * caller gets its own sessions. Close the returned context when done.
 */
export async function openSignedInPage(email: string): Promise<{ page: Page; context: BrowserContext }> {
  const context = await launchBrowser();
  const cookie = await signIn(email);
  const url = new URL(APP_URL);
  await context.addCookies(
    cookie.split('; ').map((pair) => {
      const at = pair.indexOf('=');
      return {
        name: pair.slice(0, at),
        value: pair.slice(at + 1),
        domain: url.hostname,
        path: '/',
        httpOnly: true,
        sameSite: 'Lax' as const,
      };
    }),
  );
  return { page: await context.newPage(), context };
}

const AXE_SOURCE = readFileSync(join(process.cwd(), 'node_modules', 'axe-core', 'axe.min.js'), 'utf8');
interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: string[] }[];
}

/** Serious and critical axe-core violations on the page as it is now, one readable line each. */
export async function seriousAxeViolations(page: Page): Promise<string[]> {
  await page.addScriptTag({ content: AXE_SOURCE });
  const violations = await page.evaluate(async () => {
    const axe = (
      window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: AxeViolation[] }> } }
    ).axe;
    return (await axe.run(document, { resultTypes: ['violations'] })).violations;
  });
  return violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map(
      (v) =>
        `${v.id} (${v.impact}): ${v.help} at ${v.nodes
          .slice(0, 3)
          .map((n) => n.target.join(' '))
          .join(', ')}`,
    );
}
