import { describe, expect, it } from 'vitest';
import { runSucceeded } from '../helpers/assessments';
import { APP_URL, DEMO_ACCOUNTS, api, createOtherTrust, signIn } from '../helpers/session';

// Pages are rendered on the server with the islands' data-fetching caches. Nothing cached while rendering one
// person's page may appear in the next person's: a cache that outlived its request once rendered the demo trust's
// assessment runs into another trust's page (and made the browser's hydration fail, React error #418).

const page = async (path: string, cookie: string) => (await fetch(`${APP_URL}${path}`, { headers: { cookie } })).text();

describe('server-rendered pages keep each request to itself', () => {
  it('never renders one trust’s assessment runs into another trust’s assessments page', async () => {
    const demo = await signIn(DEMO_ACCOUNTS.estates_manager);
    const started = await api('/api/assessments', {
      method: 'POST',
      cookie: demo,
      body: JSON.stringify({ scope: 'trust' }),
    });
    expect(started.status).toBe(202);
    // The demo trust's page names who started its runs …
    expect(await page('/app/assessments', demo)).toContain(DEMO_ACCOUNTS.estates_manager);
    // … and the very next render, for a trust with no runs at all, must not.
    const other = await createOtherTrust();
    const html = await page('/app/assessments', other.cookie);
    expect(html).toContain('No assessment has been run yet.');
    expect(html).not.toContain(DEMO_ACCOUNTS.estates_manager);
    expect(html).not.toContain('airtally-default-2026');
    // The run this started ends here, not during the next test file.
    await runSucceeded(demo, ((await started.json()) as { id: string }).id);
  });
});
