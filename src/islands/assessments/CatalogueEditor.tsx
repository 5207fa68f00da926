/** Edit the trust's unit catalogue: technical fields for estates managers, costs for finance leads, both for admins. */
import { QueryClientProvider } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import type { UnitModel } from '../../lib/engine';
import { assessmentsQueryClient, useSaveCatalogue } from '../../lib/client/assessments';
import { useHydrated } from '../use-hydrated';

type Model = UnitModel;

interface Props {
  models: Model[];
  canTechnical: boolean;
  canFinancial: boolean;
}

const COLUMNS: { key: keyof Model; label: string; kind: 'technical' | 'financial'; step?: string }[] = [
  { key: 'id', label: 'Id', kind: 'technical' },
  { key: 'name', label: 'Name', kind: 'technical' },
  { key: 'nominalFlowLps', label: 'Flow (l/s)', kind: 'technical', step: '1' },
  { key: 'heatRecoveryEfficiency', label: 'Heat recovery (0–1)', kind: 'technical', step: 'any' },
  { key: 'specificFanPowerWPerLps', label: 'SFP (W per l/s)', kind: 'technical', step: 'any' },
  { key: 'soundDbA', label: 'Sound (dB(A))', kind: 'technical', step: '1' },
  { key: 'lifeYears', label: 'Life (years)', kind: 'technical', step: '1' },
  { key: 'installedCostGbp', label: 'Installed cost (£)', kind: 'financial', step: 'any' },
  { key: 'annualMaintenanceGbp', label: 'Maintenance (£/year)', kind: 'financial', step: 'any' },
];

function Editor({ models: initial, canTechnical, canFinancial }: Props) {
  const hydrated = useHydrated();
  const [models, setModels] = useState(initial);
  const save = useSaveCatalogue();
  const isNew = (m: Model) => !initial.some((x) => x.id === m.id);
  const editable = (m: Model, kind: 'technical' | 'financial') =>
    isNew(m) ? canTechnical : kind === 'technical' ? canTechnical : canFinancial;

  function set(index: number, key: keyof Model, raw: string) {
    setModels((list) =>
      list.map((m, i) => (i === index ? { ...m, [key]: key === 'id' || key === 'name' ? raw : Number(raw) } : m)),
    );
  }
  function submit(event: FormEvent) {
    event.preventDefault();
    save.mutate({ models }, { onSuccess: () => window.location.reload() });
  }

  return (
    <form onSubmit={submit} data-testid="catalogue-editor">
      <div className="overflow-x-auto">
        <table className="w-full text-sm">
          <thead>
            <tr className="border-b border-line text-left text-ink-muted">
              {COLUMNS.map((c) => (
                <th key={c.key} className="py-1.5 pr-2">
                  {c.label}
                  <span className="block text-xs font-normal">{c.kind}</span>
                </th>
              ))}
              <th></th>
            </tr>
          </thead>
          <tbody>
            {models.map((m, i) => (
              <tr key={i} className="border-b border-line">
                {COLUMNS.map((c) => (
                  <td key={c.key} className="py-1 pr-2">
                    <input
                      aria-label={`${c.label} of ${m.name || 'new model'}`}
                      type={c.key === 'id' || c.key === 'name' ? 'text' : 'number'}
                      step={c.step}
                      value={String(m[c.key])}
                      disabled={!editable(m, c.kind) || (c.key === 'id' && !isNew(m))}
                      onChange={(e) => set(i, c.key, e.target.value)}
                      className="w-full min-w-16 rounded-control border border-line bg-surface px-1.5 py-1 disabled:border-transparent disabled:bg-transparent"
                    />
                  </td>
                ))}
                <td>
                  {canTechnical && (
                    <button
                      type="button"
                      onClick={() => setModels((list) => list.filter((_, j) => j !== i))}
                      className="text-sm text-danger"
                    >
                      Remove
                    </button>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="mt-3 flex gap-3">
        {canTechnical && (
          <button
            type="button"
            onClick={() =>
              setModels((list) => [
                ...list,
                {
                  id: `unit-${list.length + 1}`,
                  name: 'New unit',
                  nominalFlowLps: 100,
                  heatRecoveryEfficiency: 0.75,
                  specificFanPowerWPerLps: 1.2,
                  installedCostGbp: 5000,
                  annualMaintenanceGbp: 150,
                  lifeYears: 15,
                  soundDbA: 32,
                },
              ])
            }
            className="rounded-control border border-line px-3 py-1.5 text-sm"
          >
            Add a model
          </button>
        )}
        {(canTechnical || canFinancial) && (
          <button
            type="submit"
            disabled={!hydrated || save.isPending}
            className="rounded-control bg-brand px-4 py-1.5 text-sm font-semibold text-white disabled:opacity-60"
          >
            Save catalogue as a new version
          </button>
        )}
      </div>
      {save.isError && (
        <p role="alert" className="mt-2 text-sm text-danger">
          {save.error.message}
        </p>
      )}
    </form>
  );
}

export default function CatalogueEditor(props: Props) {
  return (
    <QueryClientProvider client={assessmentsQueryClient()}>
      <Editor {...props} />
    </QueryClientProvider>
  );
}
