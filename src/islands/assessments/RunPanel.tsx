/** Start an assessment (for roles that may), follow its progress, and see the recent runs. */
import { QueryClientProvider, useQueryClient } from '@tanstack/react-query';
import { useEffect, useState, type FormEvent } from 'react';
import {
  assessmentsQueryClient,
  useRuns,
  useRunStatus,
  useSaveRetention,
  useStartRun,
  type RetentionSettings,
  type RunStatusView,
} from '../../lib/client/assessments';
import { formatDateTime, formatDecimals, formatInteger } from '../../lib/format';
import { useHydrated } from '../use-hydrated';

interface Props {
  canRun: boolean;
  /** False for a member limited to some schools: they run their schools one at a time. */
  canRunTrust: boolean;
  schools: { id: string; name: string }[];
  initialRuns: RunStatusView[];
  /** How many runs keep their results; the trust admin may change it. */
  retention: RetentionSettings;
  canSetRetention: boolean;
}

const STATUS_WORDS: Record<RunStatusView['status'], string> = {
  queued: 'Queued',
  running: 'Running',
  succeeded: 'Finished',
  failed: 'Failed',
};
const when = (iso: string | null) => formatDateTime(iso);
const seconds = (run: RunStatusView) =>
  run.startedAt && run.finishedAt
    ? `${formatDecimals((new Date(run.finishedAt).getTime() - new Date(run.startedAt).getTime()) / 1000, 1, 1)} s`
    : '—';

function Progress({ id, onDone }: { id: string; onDone: () => void }) {
  const { data, error } = useRunStatus(id);
  const finished = data?.status === 'succeeded' || data?.status === 'failed';
  useEffect(() => {
    if (finished) onDone();
  }, [finished, onDone]);
  if (error)
    return (
      <p role="alert" className="text-sm text-danger">
        {error.message}
      </p>
    );
  if (!data) return <p className="text-sm text-ink-muted">Starting…</p>;
  const pct =
    data.roomsTotal > 0 ? Math.round((100 * data.roomsDone) / data.roomsTotal) : data.status === 'succeeded' ? 100 : 0;
  return (
    <div className="mt-4" data-testid="run-progress" data-status={data.status}>
      <div className="flex justify-between text-sm">
        <span>
          {STATUS_WORDS[data.status]}
          {data.scope === 'school' && data.schoolName ? ` · ${data.schoolName}` : ' · whole trust'}
        </span>
        <span>
          {formatInteger(data.roomsDone)} of {formatInteger(data.roomsTotal)} rooms
          {data.chunks.total > 1 &&
            ` · parts: ${formatInteger(data.chunks.done)} of ${formatInteger(data.chunks.total)} done, ${formatInteger(data.chunks.running)} being worked`}
        </span>
      </div>
      <div
        role="progressbar"
        aria-label="Assessment progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        className="mt-1 h-3 w-full overflow-hidden rounded-control bg-brand-soft"
      >
        <div
          className={`h-full ${data.status === 'failed' ? 'bg-danger' : 'bg-brand'} transition-all`}
          style={{ width: `${pct}%` }}
        />
      </div>
      {data.status === 'succeeded' && (
        <p className="mt-2 text-sm" role="status">
          Finished in {seconds(data)}.{' '}
          <a href="/app/priorities" className="underline">
            See the priorities
          </a>{' '}
          or{' '}
          <a href="/api/exports/results.xlsx" className="underline">
            download the results (.xlsx)
          </a>
          .{data.problems.length > 0 && ` ${data.problems.length} room(s) could not be assessed: see below.`}
        </p>
      )}
      {data.status === 'failed' && (
        <p role="alert" className="mt-2 text-sm text-danger">
          {data.error}
        </p>
      )}
      {data.problems.length > 0 && (
        <ul className="mt-2 list-disc pl-6 text-sm">
          {data.problems.slice(0, 20).map((p) => (
            <li key={p.roomId}>
              {p.roomCode}: {p.message}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

/** How many of the latest runs keep their results (a trust admin changes it; older runs' results are removed). */
function Retention({
  retention,
  canSet,
  hydrated,
}: {
  retention: RetentionSettings;
  canSet: boolean;
  hydrated: boolean;
}) {
  const save = useSaveRetention();
  const [keepRuns, setKeepRuns] = useState(String(retention.keepRuns));
  const kept = save.data?.settings.keepRuns ?? retention.keepRuns;
  const words = `Results are kept for the latest ${kept} successful runs, and always for the runs the priorities show now and for any run a saved capital programme was planned from. Older runs stay in the list with their results removed.`;
  if (!canSet) return <p className="mt-6 text-sm text-ink-muted">{words}</p>;
  return (
    <form
      className="mt-6 flex flex-wrap items-end gap-3 text-sm"
      onSubmit={(event) => {
        event.preventDefault();
        save.mutate(Number(keepRuns));
      }}
    >
      <p className="w-full text-ink-muted">{words}</p>
      <label>
        <span className="block text-ink-muted">Keep results of the latest</span>
        <input
          type="number"
          name="keepRuns"
          min={1}
          max={100}
          step={1}
          value={keepRuns}
          onChange={(e) => setKeepRuns(e.target.value)}
          className="mt-1 w-24 rounded-control border border-line bg-surface px-2 py-1.5"
        />
      </label>
      <button
        type="submit"
        disabled={save.isPending || !hydrated}
        className="rounded-control border border-line px-3 py-1.5 font-semibold disabled:opacity-60"
      >
        Save
      </button>
      {save.isError && (
        <p role="alert" className="w-full text-danger">
          {save.error.message}
        </p>
      )}
      {save.isSuccess && (
        <p role="status" className="w-full">
          Saved.{' '}
          {save.data.prunedRuns === 0
            ? 'No run lost its results.'
            : `Results of ${save.data.prunedRuns} older run(s) removed.`}
        </p>
      )}
    </form>
  );
}

function Panel({ canRun, canRunTrust, schools, initialRuns, retention, canSetRetention }: Props) {
  const hydrated = useHydrated();
  const client = useQueryClient();
  const runs = useRuns(initialRuns);
  const start = useStartRun();
  const active = initialRuns.find((r) => r.status === 'queued' || r.status === 'running');
  const [runId, setRunId] = useState<string | null>(active?.id ?? null);
  const [scope, setScope] = useState(canRunTrust ? 'trust' : (schools[0]?.id ?? ''));

  function submit(event: FormEvent) {
    event.preventDefault();
    start.mutate(scope === 'trust' ? { scope: 'trust' } : { scope: 'school', schoolId: scope }, {
      onSuccess: ({ id }) => setRunId(id),
    });
  }

  return (
    <div>
      {canRun ? (
        <form onSubmit={submit} className="flex flex-wrap items-end gap-3">
          <label className="text-sm">
            <span className="block text-ink-muted">Assess</span>
            <select
              name="scope"
              value={scope}
              onChange={(e) => setScope(e.target.value)}
              className="mt-1 rounded-control border border-line bg-surface px-2 py-1.5"
            >
              {canRunTrust && <option value="trust">The whole trust</option>}
              {schools.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name}
                </option>
              ))}
            </select>
          </label>
          <button
            type="submit"
            disabled={!hydrated || start.isPending}
            className="rounded-control bg-brand px-4 py-2 text-sm font-semibold text-white disabled:opacity-60"
          >
            Run assessment
          </button>
        </form>
      ) : (
        <p className="text-sm text-ink-muted">
          Your role can read results; estates managers, finance leads and trust admins start runs.
        </p>
      )}
      {start.isError && (
        <p role="alert" className="mt-2 text-sm text-danger">
          {start.error.message}
        </p>
      )}
      {runId && (
        <Progress
          key={runId}
          id={runId}
          onDone={() => void client.invalidateQueries({ queryKey: ['assessment-runs'] })}
        />
      )}

      <h2 className="mt-8 text-lg font-semibold">Recent runs</h2>
      {runs.data.length === 0 ? (
        <p className="mt-2 text-sm text-ink-muted">No assessment has been run yet.</p>
      ) : (
        <div className="mt-2 overflow-x-auto">
          <table className="w-full text-sm" data-testid="runs-table">
            <thead>
              <tr className="border-b border-line text-left text-ink-muted">
                <th className="py-1.5 pr-4">Started</th>
                <th className="pr-4">Scope</th>
                <th className="pr-4">Status</th>
                <th className="pr-4 text-right">Rooms</th>
                <th className="pr-4 text-right">Took</th>
                <th className="pr-4">Assumptions</th>
                <th>By</th>
              </tr>
            </thead>
            <tbody>
              {runs.data.map((r) => (
                <tr key={r.id} className="border-b border-line">
                  <td className="py-1.5 pr-4">{when(r.createdAt)}</td>
                  <td className="pr-4">{r.scope === 'trust' ? 'Whole trust' : r.schoolName}</td>
                  <td className="pr-4">
                    {STATUS_WORDS[r.status]}
                    {r.status === 'failed' && r.error ? `: ${r.error}` : ''}
                    {r.resultsPrunedAt ? ' (results removed: older than the runs kept)' : ''}
                  </td>
                  <td className="pr-4 text-right">
                    {formatInteger(r.roomsDone)} / {formatInteger(r.roomsTotal)}
                  </td>
                  <td className="pr-4 text-right">{seconds(r)}</td>
                  <td className="pr-4">{r.assumptionsVersion ?? '—'}</td>
                  <td>{r.startedByEmail ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Retention retention={retention} canSet={canSetRetention} hydrated={hydrated} />
    </div>
  );
}

export default function RunPanel(props: Props) {
  return (
    <QueryClientProvider client={assessmentsQueryClient()}>
      <Panel {...props} />
    </QueryClientProvider>
  );
}
