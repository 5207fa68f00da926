/** The what-if panel: change pupils, openable area or add units and see the room re-assessed (nothing is saved). */
import { QueryClientProvider } from '@tanstack/react-query';
import { lazy, Suspense, useState, type FormEvent } from 'react';
import { assessmentsQueryClient, useWhatIf, type WhatIfAnswer, type WhatIfBody } from '../../lib/client/assessments';
import { useHydrated } from '../use-hydrated';
import { riskBandTitle } from '../../lib/engine/risk';
import { formatGbp, formatInteger } from '../../lib/format';

const Co2DayChart = lazy(() => import('./Co2DayChart'));

interface Props {
  roomId: string;
  pupils: number;
  openableAreaM2: number;
  glazingAreaM2: number;
  catalogue: { id: string; name: string; nominalFlowLps: number }[];
}

const int = (v: number) => (Number.isFinite(v) ? formatInteger(Math.round(v)) : '—');
const gbp = (v: number) => (Number.isFinite(v) ? formatGbp(v) : '—');
const SEASON_LABELS = { winter: 'Winter', mid: 'Spring and autumn', summer: 'Summer' } as const;

function Comparison({ answer }: { answer: WhatIfAnswer }) {
  const { current: a, whatIf: b } = answer;
  const worstA = a.seasons[a.worstSeason];
  const worstB = b.seasons[b.worstSeason];
  const rows: [string, string, string][] = [
    ['Band', riskBandTitle(a.risk.band), riskBandTitle(b.risk.band)],
    ['Pupil-hours a year above threshold', int(a.risk.pupilHoursPerYearAbove), int(b.risk.pupilHoursPerYearAbove)],
    [
      'Worst-season occupied mean CO2',
      `${int(worstA.occupiedMeanCo2Ppm)} ppm`,
      `${int(worstB.occupiedMeanCo2Ppm)} ppm`,
    ],
    ['Worst-season peak CO2', `${int(worstA.peakCo2Ppm)} ppm`, `${int(worstB.peakCo2Ppm)} ppm`],
    [
      'Winter fresh air',
      `${int(a.seasons.winter.ventilation.totalLps)} l/s`,
      `${int(b.seasons.winter.ventilation.totalLps)} l/s`,
    ],
    ['Criterion', a.criteriaMet ? 'Met' : 'Not met', b.criteriaMet ? 'Met' : 'Not met'],
    [
      'Units recommended',
      a.appraisal?.feasible && a.appraisal.recommended ? a.appraisal.unitModels : 'None',
      b.appraisal?.feasible && b.appraisal.recommended ? b.appraisal.unitModels : 'None',
    ],
    [
      'Capital of those units',
      a.appraisal?.feasible && a.appraisal.recommended ? gbp(a.appraisal.capitalCostGbp) : '—',
      b.appraisal?.feasible && b.appraisal.recommended ? gbp(b.appraisal.capitalCostGbp) : '—',
    ],
  ];
  const curves = (['winter', 'mid', 'summer'] as const).map((s) => ({
    label: SEASON_LABELS[s],
    points: b.seasons[s].curve,
  }));
  const limits = [{ label: `Daily mean limit ${int(b.criterion.meanLimitPpm)} ppm`, ppm: b.criterion.meanLimitPpm }];
  return (
    <div className="mt-4" data-testid="what-if-result">
      <p className="text-sm">{answer.changes.join('; ')}</p>
      <table className="mt-2 w-full text-sm">
        <thead>
          <tr className="border-b border-line text-left text-ink-muted">
            <th className="py-1.5 pr-4"></th>
            <th className="pr-4 text-right">Today</th>
            <th className="text-right">With the changes</th>
          </tr>
        </thead>
        <tbody>
          {rows.map(([name, today, changed]) => (
            <tr key={name} className="border-b border-line">
              <th scope="row" className="py-1.5 pr-4 text-left font-normal">
                {name}
              </th>
              <td className="pr-4 text-right">{today}</td>
              <td className="text-right font-semibold">{changed}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-sm">{b.risk.reason}</p>
      <div className="mt-4 h-72 w-full">
        <Suspense fallback={<p className="text-sm text-ink-muted">Loading the chart…</p>}>
          <Co2DayChart curves={curves} limits={limits} />
        </Suspense>
      </div>
    </div>
  );
}

function Panel({ roomId, pupils, openableAreaM2, glazingAreaM2, catalogue }: Props) {
  const hydrated = useHydrated();
  const [pupilsText, setPupilsText] = useState(String(pupils));
  const [openableText, setOpenableText] = useState(String(openableAreaM2));
  const [modelId, setModelId] = useState('');
  const [count, setCount] = useState('1');
  const ask = useWhatIf(roomId);

  function submit(event: FormEvent) {
    event.preventDefault();
    const body: WhatIfBody = {};
    const p = Number(pupilsText);
    const o = Number(openableText);
    if (pupilsText.trim() !== '' && p !== pupils) body.pupils = p;
    if (openableText.trim() !== '' && o !== openableAreaM2) body.openableAreaM2 = o;
    if (modelId) body.addUnits = [{ modelId, count: Number(count) }];
    ask.mutate(body);
  }

  return (
    <div>
      <form onSubmit={submit} className="mt-3 grid gap-3 sm:grid-cols-4 sm:items-end">
        <label className="text-sm">
          <span className="block text-ink-muted">Pupils</span>
          <input
            name="pupils"
            type="number"
            min={0}
            max={500}
            step={1}
            value={pupilsText}
            onChange={(e) => setPupilsText(e.target.value)}
            className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
          />
        </label>
        <label className="text-sm">
          <span className="block text-ink-muted">Openable window area (m², up to {glazingAreaM2})</span>
          <input
            name="openableAreaM2"
            type="number"
            min={0}
            max={glazingAreaM2}
            step="any"
            value={openableText}
            onChange={(e) => setOpenableText(e.target.value)}
            className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
          />
        </label>
        <div className="flex gap-2 text-sm">
          <label className="flex-1">
            <span className="block text-ink-muted">Add units</span>
            <select
              name="modelId"
              value={modelId}
              onChange={(e) => setModelId(e.target.value)}
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
            >
              <option value="">None</option>
              {catalogue.map((m) => (
                <option key={m.id} value={m.id}>{`${m.name} (${m.nominalFlowLps} l/s)`}</option>
              ))}
            </select>
          </label>
          <label className="w-16">
            <span className="block text-ink-muted">Count</span>
            <input
              name="count"
              type="number"
              min={1}
              max={12}
              value={count}
              onChange={(e) => setCount(e.target.value)}
              className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
            />
          </label>
        </div>
        <button
          type="submit"
          disabled={!hydrated || ask.isPending}
          className="rounded-control bg-brand px-4 py-1.5 text-sm font-semibold text-white disabled:opacity-60"
        >
          {ask.isPending ? 'Working it out…' : 'Show what changes'}
        </button>
      </form>
      {ask.isError && (
        <p role="alert" className="mt-3 rounded-control bg-danger-soft px-3 py-2 text-sm text-danger">
          {ask.error.message}
        </p>
      )}
      {ask.data && <Comparison answer={ask.data} />}
    </div>
  );
}

export default function WhatIfPanel(props: Props) {
  return (
    <QueryClientProvider client={assessmentsQueryClient()}>
      <Panel {...props} />
    </QueryClientProvider>
  );
}
