import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_TRUST } from '../../scripts/seed/demo-trust';
import { createDb } from '../../src/lib/server/db/client';
import { runSucceeded, startRun } from '../helpers/assessments';
import { DEMO_ACCOUNTS, api, signIn } from '../helpers/session';

const db = createDb(process.env.DATABASE_URL!);

interface Entry {
  path: string;
  value: unknown;
  source: string;
  status: string;
  kind: string;
  flagged: boolean;
}
interface View {
  version: number;
  label: string;
  entries: Entry[];
  catalogue: { id: string; nominalFlowLps: number; installedCostGbp: number }[];
  versions: { version: number }[];
}

describe('assumption sets', () => {
  const cookies: Record<keyof typeof DEMO_ACCOUNTS, string> = {
    trust_admin: '',
    estates_manager: '',
    finance_lead: '',
    viewer: '',
  };
  let original: View;
  beforeAll(async () => {
    for (const role of Object.keys(DEMO_ACCOUNTS) as (keyof typeof DEMO_ACCOUNTS)[])
      cookies[role] = await signIn(DEMO_ACCOUNTS[role]);
    original = await view();
  });
  afterAll(async () => {
    // Put the values other test files rely on back (as a new version: history is never rewritten).
    const storedValue = (path: string) => original.entries.find((e) => e.path === path)!.value;
    await patch('trust_admin', {
      changes: ['air.outdoorCo2Ppm', 'finance.discountRate'].map((path) => ({ path, value: storedValue(path) })),
      summary: 'Restore after test',
    });
    await api('/api/unit-models', {
      method: 'PUT',
      cookie: cookies.trust_admin,
      body: JSON.stringify({ models: original.catalogue, summary: 'Restore after test' }),
    });
    await db.destroy();
  });

  async function view(role: keyof typeof DEMO_ACCOUNTS = 'viewer'): Promise<View> {
    const response = await api('/api/assumptions', { cookie: cookies[role] });
    expect(response.status).toBe(200);
    return (await response.json()) as View;
  }
  const patch = (role: keyof typeof DEMO_ACCOUNTS, body: unknown) =>
    api('/api/assumptions', { method: 'PATCH', cookie: cookies[role], body: JSON.stringify(body) });
  const putCatalogue = (role: keyof typeof DEMO_ACCOUNTS, models: unknown) =>
    api('/api/unit-models', { method: 'PUT', cookie: cookies[role], body: JSON.stringify({ models }) });

  it('shows every value with its source, status and kind; the BB101 cap conflict is flagged', async () => {
    const v = await view();
    expect(v.entries.length).toBeGreaterThan(40);
    for (const e of v.entries) {
      expect(e.source.length).toBeGreaterThan(3);
      expect(['confirmed', 'secondary', 'from_memory', 'common_practice']).toContain(e.status);
      expect(['technical', 'financial']).toContain(e.kind);
    }
    expect(v.entries.find((e) => e.path === 'criteria.packs')!.flagged).toBe(true);
    expect(v.entries.find((e) => e.path === 'finance.discountRate')!.kind).toBe('financial');
  });

  it("an estates manager's technical edit makes a new version, audited; a financial edit is 403", async () => {
    const before = await view();
    const ok = await patch('estates_manager', {
      changes: [{ path: 'air.outdoorCo2Ppm', value: 450 }],
      summary: 'Busy road outside',
    });
    expect(ok.status).toBe(201);
    const after = await view();
    expect(after.version).toBe(before.version + 1);
    expect(after.versions.length).toBe(before.versions.length + 1);
    expect(after.entries.find((e) => e.path === 'air.outdoorCo2Ppm')!.value).toBe(450);
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'actor_email', 'after'])
      .where('trust_id', '=', DEMO_TRUST.id)
      .where('action', '=', 'assumptions.changed')
      .orderBy('created_at', 'desc')
      .limit(1)
      .executeTakeFirstOrThrow();
    expect(audit.actor_email).toBe(DEMO_ACCOUNTS.estates_manager);
    expect(audit.after).toEqual({ 'air.outdoorCo2Ppm': 450 });

    const denied = await patch('estates_manager', { changes: [{ path: 'finance.discountRate', value: 0.05 }] });
    expect(denied.status).toBe(403);
    expect((await view()).version).toBe(after.version);
  });

  it('a finance lead edits financial values but not technical ones; a viewer edits nothing', async () => {
    expect((await patch('finance_lead', { changes: [{ path: 'finance.discountRate', value: 0.05 }] })).status).toBe(
      201,
    );
    expect((await view()).entries.find((e) => e.path === 'finance.discountRate')!.value).toBe(0.05);
    expect((await patch('finance_lead', { changes: [{ path: 'air.outdoorCo2Ppm', value: 430 }] })).status).toBe(403);
    expect((await patch('viewer', { changes: [{ path: 'air.outdoorCo2Ppm', value: 430 }] })).status).toBe(403);
  });

  it('rejects out-of-range values, a changed form and unknown paths with 400 naming the assumption', async () => {
    const range = await patch('trust_admin', { changes: [{ path: 'air.outdoorCo2Ppm', value: 5000 }] });
    expect(range.status).toBe(400);
    expect(((await range.json()) as { error: { details: { path: string } } }).error.details.path).toBe(
      'air.outdoorCo2Ppm',
    );
    expect((await patch('trust_admin', { changes: [{ path: 'air.outdoorCo2Ppm', value: 'lots' }] })).status).toBe(400);
    expect((await patch('trust_admin', { changes: [{ path: 'air.nothingHere', value: 1 }] })).status).toBe(400);
  });

  it('a run records the assumption version it used', async () => {
    const current = await view();
    const id = await startRun(cookies.estates_manager);
    const run = await db
      .selectFrom('assessment_runs')
      .select(['assumptions_version', 'assumption_set_id'])
      .where('id', '=', id)
      .executeTakeFirstOrThrow();
    expect(run.assumptions_version).toBe(current.label);
    await runSucceeded(cookies.viewer, id);
    // A room's detail, recomputed from what the run kept, records the version too.
    const stored = await db
      .selectFrom('room_results')
      .select('room_id')
      .where('run_id', '=', id)
      .limit(1)
      .executeTakeFirstOrThrow();
    const detail = await api(`/api/assessments/${id}/rooms/${stored.room_id}`, { cookie: cookies.viewer });
    expect(detail.status).toBe(200);
    const body = (await detail.json()) as { assessment: { assumptionsVersion: string }; assumptionsLabel: string };
    expect(body.assessment.assumptionsVersion).toBe(current.label);
    expect(body.assumptionsLabel).toBe(current.label);
  });

  it('unit catalogue: flows are technical, costs financial, adding a model technical', async () => {
    const { catalogue } = await view();
    const moreFlow = catalogue.map((m, i) => (i === 0 ? { ...m, nominalFlowLps: m.nominalFlowLps + 10 } : m));
    expect((await putCatalogue('finance_lead', moreFlow)).status).toBe(403);
    expect((await putCatalogue('estates_manager', moreFlow)).status).toBe(201);
    const cheaper = moreFlow.map((m, i) => (i === 0 ? { ...m, installedCostGbp: m.installedCostGbp - 100 } : m));
    expect((await putCatalogue('estates_manager', cheaper)).status).toBe(403);
    expect((await putCatalogue('finance_lead', cheaper)).status).toBe(201);
    const after = await view();
    expect(after.catalogue[0]!.nominalFlowLps).toBe(catalogue[0]!.nominalFlowLps + 10);
    expect(after.catalogue[0]!.installedCostGbp).toBe(catalogue[0]!.installedCostGbp - 100);
    const added = [
      ...cheaper,
      { ...cheaper[0]!, id: 'ceiling-200', name: 'Ceiling cassette 200', nominalFlowLps: 200 },
    ];
    expect((await putCatalogue('finance_lead', added)).status).toBe(403);
    const bad = await putCatalogue('trust_admin', [{ ...cheaper[0]!, heatRecoveryEfficiency: 1.5 }]);
    expect(bad.status).toBe(400);
  });
});
