/**
 * The programme settings form (estates managers and finance leads): capital per year, on-costs, works windows,
 * contractor capacity, mobilisation, heating projects to join, and the scenario's energy prices. Percentages
 * are typed as people say them (12 %) and sent as fractions; a worked line shows what £10,000 of units costs.
 */
import { useMemo, useState } from 'react';
import { programmeYearLabel, WINDOW_LABELS, WINDOW_ORDER } from '../../lib/engine/programme/calendar';
import { onCostBreakdown } from '../../lib/engine/programme/on-costs';
import type { ProgrammeSettings, WindowId } from '../../lib/engine/programme/types';
import { ApiError, createProgramme, updateProgramme } from '../../lib/client/programme';
import { formatGbp } from '../../lib/format';
import { useHydrated } from '../use-hydrated';

export interface BlockOption {
  id: string;
  label: string;
  /** Calendar year the heating plant is expected to need replacing, when known. */
  heatingDueYear: number | null;
}

interface Props {
  mode: 'create' | 'edit';
  programmeId?: string;
  basedOn?: string;
  initialName: string;
  initial: ProgrammeSettings;
  blocks: BlockOption[];
}

const pctOf = (f: number) => Number((f * 100).toFixed(2));
const input = 'mt-1 w-full rounded-control border border-line bg-canvas px-2 py-1.5 text-ink';
const fieldset = 'mt-6 rounded-card border border-line bg-surface p-4';

export default function SettingsForm({ mode, programmeId, basedOn, initialName, initial, blocks }: Props) {
  const [name, setName] = useState(initialName);
  const [s, setS] = useState<ProgrammeSettings>(initial);
  const [busy, setBusy] = useState(false);
  const hydrated = useHydrated();
  const [error, setError] = useState<string | null>(null);
  const years = s.budgetsGbp.length;
  const set = (patch: Partial<ProgrammeSettings>) => setS((old) => ({ ...old, ...patch }));
  const setOnCost = (key: keyof ProgrammeSettings['onCosts'], value: number | boolean) =>
    setS((old) => ({ ...old, onCosts: { ...old.onCosts, [key]: value } }));
  const label = (y: number) => programmeYearLabel(s.yearConvention, s.firstYear, y);
  const example = useMemo(() => {
    try {
      return [onCostBreakdown(10_000, s.onCosts, 1), onCostBreakdown(10_000, s.onCosts, years)];
    } catch {
      return null;
    }
  }, [s.onCosts, years]);

  const setYears = (n: number) => {
    const count = Math.max(1, Math.min(10, Math.round(n) || 1));
    const budgets = Array.from({ length: count }, (_, i) => s.budgetsGbp[i] ?? s.budgetsGbp.at(-1) ?? 250_000);
    set({
      budgetsGbp: budgets,
      pins: s.pins.filter((p) => p.year <= count),
      heatingJoins: s.heatingJoins.filter((j) => j.year <= count),
    });
  };
  const joinYear = (blockId: string) => s.heatingJoins.find((j) => j.blockId === blockId)?.year ?? null;
  const setJoin = (blockId: string, year: number | null) =>
    set({
      heatingJoins: [
        ...s.heatingJoins.filter((j) => j.blockId !== blockId),
        ...(year === null ? [] : [{ blockId, year }]),
      ],
    });
  /** The programme year a calendar year's summer falls in. */
  const yearOfSummer = (calendarYear: number) => {
    const y = s.yearConvention === 'sep_aug' ? calendarYear - s.firstYear : calendarYear - s.firstYear + 1;
    return y >= 1 && y <= years ? y : null;
  };

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setError(null);
    try {
      const result =
        mode === 'create'
          ? await createProgramme({ name, settings: s, ...(basedOn ? { basedOn } : {}) })
          : await updateProgramme(programmeId!, { name, settings: s });
      window.location.assign(`/app/programme/${result.programme.id}`);
    } catch (e) {
      setError(e instanceof ApiError ? e.message : 'The programme could not be saved. Please try again.');
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} className="max-w-4xl" aria-describedby={error ? 'settings-error' : undefined}>
      <label className="block font-semibold">
        Programme name
        <input
          className={input}
          value={name}
          onChange={(e) => setName(e.target.value)}
          required
          maxLength={120}
          name="name"
        />
      </label>

      <fieldset className={fieldset}>
        <legend className="px-1 font-semibold">Years and capital</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          <label className="block text-sm">
            Years run
            <select
              className={input}
              value={s.yearConvention}
              onChange={(e) => set({ yearConvention: e.target.value as ProgrammeSettings['yearConvention'] })}
            >
              <option value="sep_aug">September to August (school years)</option>
              <option value="apr_mar">April to March (financial years)</option>
            </select>
          </label>
          <label className="block text-sm">
            First year starts in
            <input
              className={input}
              type="number"
              min={2020}
              max={2100}
              value={s.firstYear}
              onChange={(e) => set({ firstYear: Number(e.target.value) })}
            />
          </label>
          <label className="block text-sm">
            Number of years (1–10)
            <input
              className={input}
              type="number"
              min={1}
              max={10}
              value={years}
              onChange={(e) => setYears(Number(e.target.value))}
              name="years"
            />
          </label>
        </div>
        <p className="mt-3 text-sm text-ink-muted">
          Capital available in each year, with on-costs (what the budget must carry):
        </p>
        <div className="mt-1 grid gap-3 sm:grid-cols-3 lg:grid-cols-5">
          {s.budgetsGbp.map((b, i) => (
            <label key={i} className="block text-sm">
              {label(i + 1)} (£)
              <input
                className={input}
                type="number"
                min={0}
                step="any"
                value={b}
                name={`budget-${i + 1}`}
                onChange={(e) =>
                  set({ budgetsGbp: s.budgetsGbp.map((x, j) => (j === i ? Number(e.target.value) : x)) })
                }
              />
            </label>
          ))}
        </div>
      </fieldset>

      <fieldset className={fieldset}>
        <legend className="px-1 font-semibold">On-costs on the installed price</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          {(
            [
              ['preliminariesRate', 'Preliminaries (%)'],
              ['feesRate', 'Fees (%)'],
              ['contingencyRate', 'Contingency (%)'],
              ['inflationRatePerYear', 'Inflation a year (%)'],
              ['vatRate', 'VAT (%)'],
            ] as const
          ).map(([key, text]) => (
            <label key={key} className="block text-sm">
              {text}
              <input
                className={input}
                type="number"
                min={0}
                max={100}
                step="any"
                name={key}
                value={pctOf(s.onCosts[key])}
                onChange={(e) => setOnCost(key, Number(e.target.value) / 100)}
              />
            </label>
          ))}
          <label className="mt-6 flex items-center gap-2 text-sm">
            <input
              type="checkbox"
              checked={s.onCosts.vatRecoverable}
              onChange={(e) => setOnCost('vatRecoverable', e.target.checked)}
            />
            The trust recovers VAT
          </label>
        </div>
        {example && (
          <p className="mt-3 text-sm text-ink-muted" data-testid="on-cost-example">
            £10,000 of units costs {formatGbp(example[0]!.chargedGbp)} in {label(1)}
            {years > 1 ? ` and ${formatGbp(example[1]!.chargedGbp)} in ${label(years)}` : ''} with these on-costs
            {s.onCosts.vatRecoverable ? ' (VAT recovered, so not charged to the budget)' : ' (including VAT)'}.
          </p>
        )}
      </fieldset>

      <fieldset className={fieldset}>
        <legend className="px-1 font-semibold">Works windows and the contractor</legend>
        <div className="grid gap-3 sm:grid-cols-4">
          {WINDOW_ORDER[s.yearConvention].map((id: WindowId) => (
            <label key={id} className="block text-sm">
              {WINDOW_LABELS[id]} (working days)
              <input
                className={input}
                type="number"
                min={0}
                max={60}
                name={`window-${id}`}
                value={s.windows.find((w) => w.id === id)?.workingDays ?? 0}
                onChange={(e) =>
                  set({
                    windows: s.windows.map((w) => (w.id === id ? { ...w, workingDays: Number(e.target.value) } : w)),
                  })
                }
              />
            </label>
          ))}
        </div>
        <div className="mt-3 grid gap-3 sm:grid-cols-3">
          <label className="block text-sm">
            Units fitted per working day
            <input
              className={input}
              type="number"
              min={0.1}
              max={1000}
              step="any"
              name="unitsPerWorkingDay"
              value={s.unitsPerWorkingDay}
              onChange={(e) => set({ unitsPerWorkingDay: Number(e.target.value) })}
            />
          </label>
          <label className="block text-sm">
            Mobilisation per school visit (£, before on-costs)
            <input
              className={input}
              type="number"
              min={0}
              step="any"
              name="mobilisationGbp"
              value={s.mobilisationGbp}
              onChange={(e) => set({ mobilisationGbp: Number(e.target.value) })}
            />
          </label>
        </div>
        <p className="mt-2 text-sm text-ink-muted">
          One visit is one school in one window: doing several rooms of a school in the same window pays its
          mobilisation once.
        </p>
      </fieldset>

      <fieldset className={fieldset}>
        <legend className="px-1 font-semibold">What to maximise, and the scenario</legend>
        <div className="flex flex-wrap gap-6 text-sm">
          <label className="flex items-center gap-2">
            <input
              type="radio"
              name="objective"
              checked={s.objective === 'pupil_hours'}
              onChange={() => set({ objective: 'pupil_hours' })}
            />
            Pupil-hours of poor air removed
          </label>
          <label className="flex items-center gap-2">
            <input
              type="radio"
              name="objective"
              checked={s.objective === 'rank_weights'}
              onChange={() => set({ objective: 'rank_weights' })}
            />
            The trust's saved ranking weights
          </label>
        </div>
        <label className="mt-3 block max-w-xs text-sm">
          Energy prices against the assessment's (%, e.g. 30 for 30 % higher)
          <input
            className={input}
            type="number"
            min={-90}
            max={500}
            step="any"
            name="energyPriceChangePct"
            value={s.energyPriceChangePct}
            onChange={(e) => set({ energyPriceChangePct: Number(e.target.value) })}
          />
        </label>
      </fieldset>

      <fieldset className={fieldset}>
        <legend className="px-1 font-semibold">Heating replacements to join</legend>
        <p className="text-sm text-ink-muted">
          Where a block's heating is replaced in a year of the programme, its ventilation work joins that project: its
          rooms, if chosen, go in that year's summer and need no visit of their own.
        </p>
        {blocks.length === 0 ? (
          <p className="mt-2 text-sm">No blocks have rooms in the programme.</p>
        ) : (
          <section className="mt-2 max-h-72 overflow-y-auto" tabIndex={0} aria-label="Blocks">
            <table className="w-full text-left text-sm">
              <thead className="text-ink-muted">
                <tr>
                  <th scope="col" className="py-1 pr-3 font-semibold">
                    Block
                  </th>
                  <th scope="col" className="py-1 font-semibold">
                    Heating replaced in
                  </th>
                </tr>
              </thead>
              <tbody>
                {blocks.map((b) => {
                  const suggested = b.heatingDueYear ? yearOfSummer(b.heatingDueYear) : null;
                  return (
                    <tr key={b.id} className="border-t border-line">
                      <th scope="row" className="py-1 pr-3 font-normal">
                        {b.label}
                        {b.heatingDueYear && (
                          <span className="block text-xs text-ink-muted">
                            plant due about {b.heatingDueYear}
                            {suggested ? ` (${label(suggested)})` : ''}
                          </span>
                        )}
                      </th>
                      <td className="py-1">
                        <select
                          aria-label={`Heating replaced in, ${b.label}`}
                          className="rounded-control border border-line bg-canvas px-2 py-1"
                          value={joinYear(b.id) ?? ''}
                          onChange={(e) => setJoin(b.id, e.target.value ? Number(e.target.value) : null)}
                        >
                          <option value="">Not in the programme</option>
                          {s.budgetsGbp.map((_, i) => (
                            <option key={i} value={i + 1}>
                              {label(i + 1)}
                            </option>
                          ))}
                        </select>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </section>
        )}
      </fieldset>

      {(s.forcedIn.length > 0 || s.keptOut.length > 0 || s.pins.length > 0) && (
        <p className="mt-4 text-sm text-ink-muted">
          {s.pins.length} room(s) placed by hand, {s.forcedIn.length} forced in and {s.keptOut.length} kept out: change
          them on the programme page.
        </p>
      )}

      {error && (
        <p
          id="settings-error"
          role="alert"
          className="mt-4 rounded-card border border-danger bg-danger-soft p-3 text-sm"
        >
          {error}
        </p>
      )}
      <div className="mt-6 flex gap-3">
        <button
          type="submit"
          disabled={!hydrated || busy}
          className="rounded-control bg-brand px-4 py-2 font-semibold text-white disabled:opacity-60"
        >
          {busy ? 'Planning…' : mode === 'create' ? 'Make the plan' : 'Save and re-plan'}
        </button>
        <a
          href={programmeId ? `/app/programme/${programmeId}` : '/app/programme'}
          className="rounded-control border border-line px-4 py-2 font-semibold no-underline"
        >
          Cancel
        </a>
      </div>
    </form>
  );
}
