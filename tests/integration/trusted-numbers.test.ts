/**
 * Numbers a practitioner can trust, end to end on the demo trust: a finance lead's energy price moves the
 * programme; existing fan systems without heat recovery and electrically heated rooms get the appraisal physics
 * gives them; each figure names its baseline, fuel, price and hours.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_TRUST } from '../../scripts/seed/demo-trust';
import { createDb } from '../../src/lib/server/db/client';
import { assess } from '../helpers/assessments';
import { DEMO_ACCOUNTS, api, signIn } from '../helpers/session';

const db = createDb(process.env.DATABASE_URL!);

interface Appraisal {
  feasible: boolean;
  replacesExistingLps: number;
  baselines: {
    same_air_without_recovery: { annual: { heatingKwh: number; fanKwh: number }; simplePaybackYears: number | null };
  };
}

interface Finance {
  totals: { annualSavingGbp: number; units: number };
  baseline: { headline: string; headlineLabel: string };
  schools: { schoolName: string; heatingUsed: { fuel: string; priceGbpPerKwh: number; priceSource: string }[] }[];
}

/** Runs the whole trust and waits for it to succeed (throws when it fails or takes over 120 s). */
const runTrust = (cookie: string) => assess(cookie, { scope: 'trust' }, 120_000);

describe('numbers a practitioner can trust', () => {
  let finance: string;
  let estates: string;
  let originalGas: number;
  beforeAll(async () => {
    finance = await signIn(DEMO_ACCOUNTS.finance_lead);
    estates = await signIn(DEMO_ACCOUNTS.estates_manager);
    const view = (await (await api('/api/assumptions', { cookie: finance })).json()) as {
      entries: { path: string; value: unknown }[];
    };
    originalGas = (view.entries.find((e) => e.path === 'finance.fuelPricesGbpPerKwh')!.value as { gas: number }).gas;
    await runTrust(estates);
  });
  afterAll(async () => {
    const view = (await (await api('/api/assumptions', { cookie: finance })).json()) as {
      entries: { path: string; value: unknown }[];
    };
    const prices = view.entries.find((e) => e.path === 'finance.fuelPricesGbpPerKwh')!.value as Record<string, number>;
    await api('/api/assumptions', {
      method: 'PATCH',
      cookie: finance,
      body: JSON.stringify({
        changes: [{ path: 'finance.fuelPricesGbpPerKwh', value: { ...prices, gas: originalGas } }],
      }),
    });
    await runTrust(estates);
    await db.destroy();
  });

  const report = async () => (await (await api('/api/finance', { cookie: finance })).json()) as Finance;

  it("names the headline baseline and, per school, the fuel and price its figures used (the trust's for most)", async () => {
    const r = await report();
    expect(r.baseline.headline).toBe('same_air_without_recovery');
    expect(r.baseline.headlineLabel).toMatch(/same air without heat recovery/);
    const sources = r.schools.flatMap((s) => s.heatingUsed.map((h) => h.priceSource));
    expect(sources.filter((s) => s === 'trust').length).toBeGreaterThan(sources.length / 2);
  });

  it("moves the programme's saving when the finance lead raises the trust's gas price by half", async () => {
    const before = await report();
    const view = (await (await api('/api/assumptions', { cookie: finance })).json()) as {
      entries: { path: string; value: unknown }[];
    };
    const prices = view.entries.find((e) => e.path === 'finance.fuelPricesGbpPerKwh')!.value as Record<string, number>;
    const patch = await api('/api/assumptions', {
      method: 'PATCH',
      cookie: finance,
      body: JSON.stringify({
        changes: [{ path: 'finance.fuelPricesGbpPerKwh', value: { ...prices, gas: 1.5 * originalGas } }],
      }),
    });
    expect(patch.status).toBe(201);
    await runTrust(estates);
    const after = await report();
    // Independent expectation from the stored lines: gas rooms priced at the trust's price gain half their heating £.
    const { rows } = await db
      .selectFrom('current_room_results')
      .select((eb) => eb.fn.sum<number>('annual_heating_saving_kwh').as('kwh'))
      .where('trust_id', '=', DEMO_TRUST.id)
      .where('unit_count', '>', 0)
      .where('heating_fuel', '=', 'gas')
      .where('price_source', '=', 'trust')
      .execute()
      .then((r) => ({ rows: r }));
    const gasKwh = Number(rows[0]?.kwh ?? 0);
    expect(gasKwh).toBeGreaterThan(10_000);
    const expectedRise = gasKwh * 0.5 * originalGas;
    expect(after.totals.annualSavingGbp - before.totals.annualSavingGbp).toBeGreaterThan(0.9 * expectedRise);
    expect(after.totals.annualSavingGbp - before.totals.annualSavingGbp).toBeGreaterThan(1000);
  });

  it('appraises rooms with fans but no heat recovery, and electrically heated rooms, against the same air by their own systems', async () => {
    const fanned = await db
      .selectFrom('current_room_results')
      .select(['run_id', 'room_id'])
      .where('trust_id', '=', DEMO_TRUST.id)
      .where('ventilation_type', '=', 'mechanical_supply_extract')
      .execute();
    expect(fanned.length).toBeGreaterThan(0);
    for (const row of fanned) {
      // The detail as the run saw it, recomputed from the inputs it kept.
      const response = await api(`/api/assessments/${row.run_id}/rooms/${row.room_id}`, { cookie: estates });
      expect(response.status).toBe(200);
      const a = ((await response.json()) as { assessment: { appraisal: Appraisal | null } }).assessment.appraisal;
      if (!a?.feasible) continue;
      // The units take over the old fans: heat recovered and less fan power against the same air by those fans,
      // servicing like for like, so a finite payback (not "never").
      const b = a.baselines.same_air_without_recovery;
      expect(a.replacesExistingLps).toBeGreaterThan(0);
      expect(b.annual.heatingKwh).toBeGreaterThan(0);
      expect(b.annual.fanKwh).toBeGreaterThan(0);
      expect(b.simplePaybackYears).not.toBeNull();
    }
    const electric = await db
      .selectFrom('current_room_results')
      .select(['heating_fuel', 'fuel_price_gbp_per_kwh', 'heating_efficiency', 'efficiency_source'])
      .where('trust_id', '=', DEMO_TRUST.id)
      .where('heating_fuel', '=', 'electric')
      .execute();
    expect(electric.length).toBeGreaterThan(0);
    // The nursery pod's own fuel is priced as electricity at efficiency 1, never with its gas school's figures.
    for (const row of electric) {
      expect(row.heating_efficiency).toBe(1);
      expect(row.fuel_price_gbp_per_kwh).toBeGreaterThan(0.2);
    }
  });
});
