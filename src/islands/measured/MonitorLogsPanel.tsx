/**
 * Monitor logs: upload one or more exports (a bar follows the upload, which the server reads as it arrives),
 * check each preview (layout, time basis, sensors matched to rooms, problems), choose rooms for unmatched
 * sensors, then import or cancel; the analysis that follows shows its own progress. Below, the trust's logs.
 */
import { useEffect, useRef, useState } from 'react';
import { apiFetch } from '../../lib/client/api';
import {
  commitLog,
  deleteLog,
  latestAnalysis,
  mapSensors,
  uploadLog,
  type AnalysisRunView,
  type LogOutcome,
  type LogView,
} from '../../lib/client/monitoring';
import { formatCount, formatDate, formatDateTime, formatInteger } from '../../lib/format';
import { useHydrated } from '../use-hydrated';

export interface RoomChoice {
  id: string;
  label: string;
}

export interface LogListItem {
  id: string;
  fileName: string;
  status: string;
  readings: number;
  firstAt: string | null;
  lastAt: string | null;
  createdAt: string;
  createdByEmail: string | null;
  sensors: number;
  rooms: number;
}

interface Props {
  canImport: boolean;
  rooms: RoomChoice[];
  schools: { id: string; name: string }[];
  initialLogs: LogListItem[];
  initialRun: AnalysisRunView | null;
}

const MATCH_WORDS: Record<string, string> = {
  room_code: 'by room code',
  remembered: 'remembered',
  chosen: 'chosen',
  unmatched: 'not matched',
  ambiguous: 'several rooms match',
  skipped: 'left out',
};

const day = (iso: string | null) => formatDate(iso);

function ProgressBar({ label, fraction }: { label: string; fraction: number | null }) {
  return (
    <div className="mt-3" data-testid="progress">
      <p className="text-sm">{label}</p>
      <div
        className="mt-1 h-2 w-full overflow-hidden rounded-control bg-brand-soft"
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        {...(fraction === null ? {} : { 'aria-valuenow': Math.round(fraction * 100) })}
      >
        <div
          className={`h-full bg-brand ${fraction === null ? 'w-1/3 animate-pulse' : ''}`}
          style={fraction === null ? undefined : { width: `${Math.round(fraction * 100)}%` }}
        />
      </div>
    </div>
  );
}

export default function MonitorLogsPanel({ canImport, rooms, schools, initialLogs, initialRun }: Props) {
  const input = useRef<HTMLInputElement>(null);
  const [queue, setQueue] = useState<File[]>([]);
  const [timeBasis, setTimeBasis] = useState('auto');
  const [schoolId, setSchoolId] = useState('');
  const [progress, setProgress] = useState<number | null>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const hydrated = useHydrated();
  const [preview, setPreview] = useState<LogView | null>(null);
  const [choices, setChoices] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [outcome, setOutcome] = useState<LogOutcome | null>(null);
  const [logs, setLogs] = useState(initialLogs);
  const [run, setRun] = useState<AnalysisRunView | null>(initialRun);

  const refreshLogs = async () => setLogs((await apiFetch<{ logs: LogListItem[] }>('/api/monitor-logs')).logs);

  // Follow an analysis while it runs.
  useEffect(() => {
    if (!run || (run.status !== 'queued' && run.status !== 'running')) return;
    const timer = setTimeout(async () => {
      const next = await latestAnalysis().catch(() => null);
      if (next?.run) setRun(next.run);
    }, 1000);
    return () => clearTimeout(timer);
  }, [run]);

  const send = async (file: File) => {
    setError(null);
    setOutcome(null);
    setPreview(null);
    setChoices({});
    setProgress(0);
    setBusy(`Uploading ${file.name}`);
    try {
      const result = await uploadLog(file, { timeBasis, schoolId }, (f) => {
        setProgress(f);
        if (f >= 1) setBusy(`Reading and checking ${file.name}`);
      });
      setPreview(result);
      await refreshLogs();
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setProgress(null);
      setBusy(null);
    }
  };

  const choose = (files: FileList | null) => {
    const list = [...(files ?? [])];
    if (list.length === 0) return;
    setQueue(list.slice(1));
    void send(list[0] as File);
  };

  const next = () => {
    const [first, ...rest] = queue;
    setQueue(rest);
    if (first) void send(first);
  };

  const applyChoices = async () => {
    if (!preview) return;
    const sensors = Object.entries(choices).map(([sensorId, roomId]) => ({
      sensorId,
      roomId: roomId === 'skip' ? null : roomId,
    }));
    if (sensors.length === 0) return;
    try {
      setPreview((await mapSensors(preview.id, sensors)).log);
      setChoices({});
    } catch (e) {
      setError((e as Error).message);
    }
  };

  const finish = async (action: 'commit' | 'cancel') => {
    if (!preview) return;
    setBusy(action === 'commit' ? 'Importing the readings' : 'Cancelling');
    try {
      const result = await commitLog(preview.id, action);
      // The analysis this commit queued is fetched first, so the outcome never shows beside an older run's status.
      const queued = result.analysisRunId ? (await latestAnalysis()).run : null;
      if (queued) setRun(queued);
      setOutcome(result.outcome);
      setPreview(null);
      await refreshLogs();
      next();
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(null);
    }
  };

  const remove = async (log: LogListItem) => {
    if (
      !window.confirm(
        `Delete ${log.fileName} and its ${formatInteger(log.readings)} readings? Other logs stay as they are.`,
      )
    )
      return;
    try {
      const result = await deleteLog(log.id);
      if (result.analysisRunId) setRun((await latestAnalysis()).run);
      await refreshLogs();
    } catch (e) {
      setError((e as Error).message);
    }
  };

  const unmatched = preview?.sensors.filter((s) => s.roomId === null) ?? [];
  return (
    <div className="grid gap-6">
      {canImport && (
        <section className="rounded-card border border-line bg-surface p-5" aria-labelledby="upload-heading">
          <h2 id="upload-heading" className="text-lg font-semibold">
            Import monitor logs
          </h2>
          <p className="mt-1 max-w-3xl text-sm text-ink-muted">
            CSV or Excel exports: one file per room or many rooms in one file, one row per reading (time, sensor, CO2)
            or one CO2 column per sensor. Sensors are matched to rooms by room code; choose the room once for any that
            are not, and Airtally remembers it. Nothing is used until you import.
          </p>
          <div className="mt-3 flex flex-wrap items-end gap-4 text-sm">
            <label className="grid gap-1">
              Times in the file
              <select
                className="rounded-control border border-line bg-surface px-2 py-1"
                value={timeBasis}
                onChange={(e) => setTimeBasis(e.target.value)}
              >
                <option value="auto">Tell from the file (UK time unless it shows UTC)</option>
                <option value="Europe/London">UK local time (GMT/BST)</option>
                <option value="UTC">UTC all year</option>
              </select>
            </label>
            <label className="grid gap-1">
              Rooms of
              <select
                className="rounded-control border border-line bg-surface px-2 py-1"
                value={schoolId}
                onChange={(e) => setSchoolId(e.target.value)}
              >
                <option value="">any school</option>
                {schools.map((s) => (
                  <option key={s.id} value={s.id}>
                    {s.name}
                  </option>
                ))}
              </select>
            </label>
            <input
              ref={input}
              type="file"
              accept=".csv,.txt,.xlsx"
              multiple
              className="sr-only"
              aria-label="Monitor log files"
              data-testid="log-files"
              onChange={(e) => choose(e.target.files)}
            />
            <button
              type="button"
              className="rounded-control bg-brand px-4 py-2 font-semibold text-white"
              disabled={!hydrated || busy !== null}
              onClick={() => input.current?.click()}
            >
              Choose log files…
            </button>
          </div>
          {busy && <ProgressBar label={busy} fraction={progress !== null && progress < 1 ? progress : null} />}
          {queue.length > 0 && (
            <p className="mt-2 text-sm text-ink-muted">{formatCount(queue.length, 'more file')} waiting.</p>
          )}
          {error && (
            <p className="mt-3 rounded-control bg-danger-soft px-3 py-2 text-danger" role="alert">
              {error}
            </p>
          )}
          {outcome && (
            <p className="mt-3 rounded-control bg-brand-soft px-3 py-2" role="status">
              {outcome.status === 'committed'
                ? `Imported ${formatInteger(outcome.readingsImported)} readings for ${formatCount(outcome.rooms, 'room')}${outcome.sensorsLeftOut > 0 ? `; ${formatCount(outcome.sensorsLeftOut, 'sensor')} left out` : ''}.`
                : 'Cancelled: nothing was stored.'}
            </p>
          )}
          {preview && (
            <div className="mt-4 grid gap-4" data-testid="log-preview">
              <div>
                <h3 className="font-semibold">{preview.fileName}</h3>
                <p className="text-sm">
                  {formatInteger(preview.readings)} readings from {day(preview.firstAt)} to {day(preview.lastAt)};{' '}
                  {(preview.layout as { kind: string }).kind === 'long'
                    ? 'one row per reading'
                    : (preview.layout as { kind: string }).kind === 'wide'
                      ? 'one CO2 column per sensor'
                      : 'one room in the file'}
                  . {(preview.layout as { basisReason: string }).basisReason}
                </p>
              </div>
              <div className="overflow-x-auto">
                <table className="w-full text-sm">
                  <caption className="sr-only">Sensors in the file and their rooms</caption>
                  <thead>
                    <tr className="border-b border-line text-left text-ink-muted">
                      <th className="py-1.5 pr-3">Sensor</th>
                      <th className="pr-3">Room</th>
                      <th className="pr-3 text-right">Readings</th>
                      <th className="pr-3 text-right">Days</th>
                      <th className="pr-3">Every</th>
                      <th>Kept besides CO2</th>
                    </tr>
                  </thead>
                  <tbody>
                    {preview.sensors.map((s) => (
                      <tr key={s.id} className="border-b border-line">
                        <th scope="row" className="py-1.5 pr-3 text-left font-normal">
                          {s.sensorKey}
                        </th>
                        <td className="pr-3">
                          {s.roomId && s.match !== 'chosen' ? (
                            <span>
                              {s.schoolName} {s.roomCode}{' '}
                              <span className="text-ink-muted">({MATCH_WORDS[s.match]})</span>
                            </span>
                          ) : (
                            <label className="flex items-center gap-2">
                              <span className={s.roomId ? '' : 'text-accent'}>
                                {s.roomId ? `${s.schoolName} ${s.roomCode}` : MATCH_WORDS[s.match]}
                              </span>
                              <select
                                aria-label={`Room for ${s.sensorKey}`}
                                className="rounded-control border border-line bg-surface px-1 py-0.5"
                                value={choices[s.id] ?? ''}
                                onChange={(e) => setChoices({ ...choices, [s.id]: e.target.value })}
                              >
                                <option value="">choose…</option>
                                <option value="skip">leave out</option>
                                {(s.candidates.length > 0
                                  ? s.candidates.map((c) => ({ id: c.roomId, label: `${c.schoolName} ${c.code}` }))
                                  : rooms
                                ).map((r) => (
                                  <option key={r.id} value={r.id}>
                                    {r.label}
                                  </option>
                                ))}
                              </select>
                            </label>
                          )}
                        </td>
                        <td className="pr-3 text-right">{formatInteger(s.readings)}</td>
                        <td className="pr-3 text-right">{s.days}</td>
                        <td className="pr-3">
                          {s.intervalSeconds ? `${Math.round(s.intervalSeconds / 60) || '<1'} min` : '—'}
                        </td>
                        <td>{s.extras.map((x) => x.label).join(', ') || '—'}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
                {Object.keys(choices).length > 0 && (
                  <button
                    type="button"
                    className="mt-2 rounded-control border border-line px-3 py-1"
                    onClick={() => void applyChoices()}
                  >
                    Use these rooms (remembered for next time)
                  </button>
                )}
              </div>
              <div>
                <h3 className="font-semibold">
                  {preview.problems.length === 0 ? 'No problems found' : 'Problems found'}
                </h3>
                <ul className="mt-1 grid gap-1 text-sm" data-testid="log-problems">
                  {preview.problems.map((p) => {
                    const named = p as typeof p & { label?: string; leftOut?: boolean };
                    return (
                      <li key={p.kind}>
                        <strong>{named.label ?? p.kind}</strong>: {formatInteger(p.count)}
                        {named.leftOut ? ' (left out)' : ''}. e.g.{' '}
                        {p.examples
                          .slice(0, 3)
                          .map((e) => [e.row ? `row ${e.row}` : e.at, e.detail].filter(Boolean).join(': '))
                          .join('; ')}
                      </li>
                    );
                  })}
                </ul>
              </div>
              <div className="flex flex-wrap gap-3">
                <button
                  type="button"
                  className="rounded-control bg-brand px-4 py-2 font-semibold text-white"
                  disabled={!hydrated || busy !== null}
                  onClick={() => void finish('commit')}
                >
                  {unmatched.length > 0
                    ? `Import; leave out ${formatCount(unmatched.length, 'sensor')} without a room`
                    : `Import ${formatInteger(preview.readings)} readings`}
                </button>
                <button
                  type="button"
                  className="rounded-control border border-line px-4 py-2"
                  onClick={() => void finish('cancel')}
                >
                  Cancel (store nothing)
                </button>
              </div>
            </div>
          )}
        </section>
      )}

      {run && (
        <section className="rounded-card border border-line bg-surface p-5" aria-labelledby="analysis-heading">
          <h2 id="analysis-heading" className="text-lg font-semibold">
            Analysis of the readings
          </h2>
          {run.status === 'queued' || run.status === 'running' ? (
            <ProgressBar
              label={`Analysing ${run.roomsDone} of ${run.roomsTotal || '…'} rooms`}
              fraction={run.roomsTotal > 0 ? run.roomsDone / run.roomsTotal : null}
            />
          ) : (
            <p className="mt-1 text-sm" role="status">
              {run.status === 'succeeded'
                ? `Last analysed ${formatDateTime(run.finishedAt)} (${formatCount(run.roomsTotal, 'room')}). Run a new assessment to bring the readings into the ranking.`
                : `The last analysis failed: ${run.error}`}
            </p>
          )}
        </section>
      )}

      <section className="rounded-card border border-line bg-surface p-5" aria-labelledby="logs-heading">
        <h2 id="logs-heading" className="text-lg font-semibold">
          Logs
        </h2>
        {logs.length === 0 ? (
          <p className="mt-1 text-sm text-ink-muted">No logs yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="mt-2 w-full text-sm">
              <caption className="sr-only">Imported monitor logs</caption>
              <thead>
                <tr className="border-b border-line text-left text-ink-muted">
                  <th className="py-1.5 pr-3">File</th>
                  <th className="pr-3">Status</th>
                  <th className="pr-3 text-right">Readings</th>
                  <th className="pr-3 text-right">Rooms</th>
                  <th className="pr-3">From</th>
                  <th className="pr-3">To</th>
                  <th className="pr-3">Uploaded by</th>
                  {canImport && <th />}
                </tr>
              </thead>
              <tbody>
                {logs.map((l) => (
                  <tr key={l.id} className="border-b border-line">
                    <th scope="row" className="py-1.5 pr-3 text-left font-normal">
                      {l.fileName}
                    </th>
                    <td className="pr-3">
                      {l.status === 'committed' ? 'imported' : l.status === 'previewed' ? 'awaiting import' : 'deleted'}
                    </td>
                    <td className="pr-3 text-right">{formatInteger(l.readings)}</td>
                    <td className="pr-3 text-right">{l.rooms}</td>
                    <td className="pr-3">{day(l.firstAt)}</td>
                    <td className="pr-3">{day(l.lastAt)}</td>
                    <td className="pr-3">{l.createdByEmail ?? '—'}</td>
                    {canImport && (
                      <td>
                        {l.status !== 'deleted' && (
                          <button type="button" className="text-danger underline" onClick={() => void remove(l)}>
                            Delete
                          </button>
                        )}
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
    </div>
  );
}
