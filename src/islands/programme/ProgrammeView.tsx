/**
 * The programme page's interactive part: year by year, window by window, school by school, with moving a room to
 * another year (a pin), keeping it out or forcing it in. Each change is re-planned and checked on the server,
 * which says what it cost in benefit; the page then shows the new plan.
 */
import { useState } from 'react';
import type { MissLine, RoomLine, SchoolVisit } from '../../lib/engine/programme/report';
import {
  ApiError,
  editProgramme,
  type ProgrammeEditRequest,
  type ProgrammeView as View,
  refreshProgramme,
  deleteProgramme,
} from '../../lib/client/programme';
import { formatGbp, formatInteger, formatDecimals, formatNumber } from '../../lib/format';
import ProgrammeChart from './ProgrammeChart';
import { useHydrated } from '../use-hydrated';

const num = 'px-2 py-1.5 text-right tabular-nums whitespace-nowrap';
const button =
  'rounded-control border border-line bg-surface px-2 py-1 text-xs font-semibold hover:bg-canvas disabled:opacity-50';

function Card({ label, value, testId }: { label: string; value: string; testId?: string }) {
  return (
    <div className="rounded-card border border-line bg-surface p-3" data-testid={testId}>
      <dt className="text-sm text-ink-muted">{label}</dt>
      <dd className="mt-1 text-lg font-bold tabular-nums">{value}</dd>
    </div>
  );
}

export default function ProgrammeView({ initial }: { initial: View }) {
  const [view, setView] = useState(initial);
  const [working, setBusy] = useState(false);
  // Buttons stay disabled until the island has hydrated, so a first click is never lost.
  const hydrated = useHydrated();
  const busy = working || !hydrated;
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [bidSchool, setBidSchool] = useState('');
  const { report } = view;
  const t = report.totals;

  async function run(work: () => Promise<{ programme: View; impact?: { words: string } }>, done?: string) {
    setBusy(true);
    setMessage(null);
    try {
      const result = await work();
      setView(result.programme);
      setMessage({ kind: 'ok', text: result.impact?.words ?? done ?? 'Done.' });
    } catch (e) {
      setMessage({ kind: 'error', text: e instanceof ApiError ? e.message : 'That did not work. Please try again.' });
    } finally {
      setBusy(false);
    }
  }
  const edit = (e: ProgrammeEditRequest) => run(() => editProgramme(view.id, e));

  const schools = new Map<string, string>();
  for (const y of report.years)
    for (const w of y.windows) for (const s of w.schools) schools.set(s.schoolId, s.schoolName);
  const pinsCost =
    view.freeValue !== null && view.freeValue > 0 ? ((view.freeValue - view.planValue) / view.freeValue) * 100 : null;

  return (
    <div>
      <div role="status" aria-live="polite" className="min-h-0">
        {message && (
          <p
            data-testid="programme-message"
            className={`mt-3 rounded-card border p-3 text-sm ${message.kind === 'ok' ? 'border-brand bg-brand-soft' : 'border-danger bg-danger-soft'}`}
          >
            {message.text}
          </p>
        )}
      </div>

      <dl className="mt-4 grid grid-cols-2 gap-3 md:grid-cols-4" data-testid="programme-totals">
        <Card
          label="Capital used, with on-costs"
          value={`${formatGbp(t.capitalGbp)} of ${formatGbp(report.budgetTotalGbp)}`}
          testId="total-capital"
        />
        <Card
          label="Rooms (units)"
          value={`${formatInteger(t.rooms)} (${formatInteger(t.units)})`}
          testId="total-rooms"
        />
        <Card label="Pupils helped" value={formatInteger(t.pupils)} />
        <Card
          label="Pupil-hours of poor air removed a year"
          value={formatInteger(t.pupilHoursRemovedPerYear)}
          testId="total-pupil-hours"
        />
        <Card label="Carbon saved a year" value={`${formatNumber(t.annualSavingKgCo2e / 1000)} tCO2e`} />
        <Card label="Carbon saved over the units' life" value={`${formatInteger(t.lifetimeTonnesCo2e)} tCO2e`} />
        <Card
          label="Money saved a year (net)"
          value={
            t.annualSavingGbp < 0 ? `${formatGbp(t.annualSavingGbp)} (costs more to run)` : formatGbp(t.annualSavingGbp)
          }
        />
        <Card
          label="Gap to the best possible plan"
          value={`${report.solve.gapPct < 0.1 ? formatDecimals(report.solve.gapPct, 2, 2) : formatNumber(report.solve.gapPct)} %`}
          testId="gap"
        />
      </dl>
      <p className="mt-3 max-w-4xl text-sm" data-testid="solve-words">
        <strong>How good this plan is.</strong> {report.solve.words}
        {pinsCost !== null && pinsCost > 0.05 && (
          <> The rooms placed by hand cost {formatNumber(pinsCost)} % of the benefit of the plan without them.</>
        )}
      </p>
      {report.partial && (
        <p className="mt-2 text-sm font-semibold">
          You see only your schools in this programme; the totals are for them.
        </p>
      )}

      <div className="mt-4 flex flex-wrap items-center gap-2">
        <a
          className="rounded-control border border-line bg-surface px-3 py-1.5 text-sm font-semibold no-underline"
          href={`/api/programmes/${view.id}/programme.xlsx`}
          data-testid="export-xlsx"
        >
          Download the programme (.xlsx)
        </a>
        <a
          className="rounded-control border border-line bg-surface px-3 py-1.5 text-sm font-semibold no-underline"
          href={`/api/programmes/${view.id}/report.pdf`}
          data-testid="export-pdf"
        >
          Board report (PDF)
        </a>
        <label className="flex items-center gap-1 text-sm">
          <span className="sr-only">School for the bid pack</span>
          <select
            className="rounded-control border border-line bg-canvas px-2 py-1.5"
            value={bidSchool}
            onChange={(e) => setBidSchool(e.target.value)}
            data-testid="bid-school"
          >
            <option value="">Bid pack for a school…</option>
            {[...schools.entries()]
              .sort((a, b) => a[1].localeCompare(b[1]))
              .map(([id, name]) => (
                <option key={id} value={id}>
                  {name}
                </option>
              ))}
          </select>
        </label>
        {bidSchool && (
          <a
            className="rounded-control border border-line bg-surface px-3 py-1.5 text-sm font-semibold no-underline"
            href={`/api/programmes/${view.id}/bid-pack.pdf?schoolId=${bidSchool}`}
            data-testid="export-bid-pack"
          >
            Download the bid pack (PDF)
          </a>
        )}
      </div>
      {view.canEdit && (
        <div className="mt-3 flex flex-wrap gap-2 text-sm">
          <a
            className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white no-underline"
            href={`/app/programme/${view.id}/settings`}
          >
            Change settings
          </a>
          <a
            className="rounded-control border border-line px-3 py-1.5 font-semibold no-underline"
            href={`/app/programme/new?basedOn=${view.id}`}
          >
            Save as a new scenario
          </a>
          <button
            type="button"
            className="rounded-control border border-line px-3 py-1.5 font-semibold"
            disabled={busy}
            onClick={() => run(() => refreshProgramme(view.id), 'Re-planned from the latest assessment results.')}
          >
            Re-plan from the latest results
          </button>
          <button
            type="button"
            className="rounded-control border border-danger px-3 py-1.5 font-semibold text-danger"
            disabled={busy}
            onClick={async () => {
              if (!window.confirm(`Delete the programme “${view.name}”? This cannot be undone.`)) return;
              await deleteProgramme(view.id);
              window.location.assign('/app/programme');
            }}
          >
            Delete
          </button>
        </div>
      )}

      <section className="mt-8" aria-labelledby="chart-heading">
        <h2 id="chart-heading" className="text-xl font-semibold">
          Benefit against spend
        </h2>
        <figure className="mt-2 rounded-card border border-line bg-surface p-4">
          <figcaption className="text-sm text-ink-muted">
            Pupil-hours of poor air removed a year as the capital is spent, room by room in programme order.
          </figcaption>
          <div className="mt-2">
            <ProgrammeChart series={[{ name: view.name, points: report.cumulative }]} />
          </div>
        </figure>
        <div className="mt-3 grid gap-3 md:grid-cols-2">
          <p className="rounded-card border border-line bg-surface p-3 text-sm" data-testid="next-tranche">
            <strong>The next £100,000.</strong> {report.nextTranche.words}
          </p>
          <p className="rounded-card border border-line bg-surface p-3 text-sm" data-testid="last-tranche">
            <strong>The last £100,000.</strong> {report.lastTranche.words}
          </p>
        </div>
      </section>

      <h2 className="mt-8 text-xl font-semibold">Year by year</h2>
      {report.years.map((y) => (
        <details
          key={y.year}
          open={y.year === 1}
          className="mt-4 rounded-card border border-line bg-surface"
          data-testid="programme-year"
        >
          <summary className="flex cursor-pointer flex-wrap items-baseline gap-x-4 border-b border-line px-4 py-3">
            <h3 id={`year-${y.year}`} className="text-lg font-semibold">
              {y.label}
            </h3>
            <span className="text-sm text-ink-muted" data-testid="year-capital">
              {formatGbp(y.totals.capitalGbp)} of {formatGbp(y.budgetGbp)} · {formatInteger(y.totals.rooms)} rooms ·{' '}
              {formatInteger(y.totals.units)} units · {formatInteger(y.totals.pupilHoursRemovedPerYear)} pupil-hours a
              year
            </span>
          </summary>
          {y.totals.rooms === 0 ? (
            <p className="px-4 py-3 text-sm text-ink-muted">No rooms this year.</p>
          ) : (
            y.windows
              .filter((w) => w.schools.length > 0)
              .map((w) => (
                <section key={w.windowId} className="overflow-x-auto px-2 pb-3" tabIndex={0} aria-label={w.label}>
                  <h4 className="px-2 pt-3 font-semibold">
                    {w.label}{' '}
                    <span className="text-sm font-normal text-ink-muted">
                      ({formatInteger(w.totals.units)} of {formatInteger(w.capacityUnits)} units the contractor can fit)
                    </span>
                  </h4>
                  <table className="mt-1 w-full text-left text-sm">
                    <thead className="border-b border-line text-ink-muted">
                      <tr>
                        <th scope="col" className="px-2 py-1.5 font-semibold">
                          School / room
                        </th>
                        <th scope="col" className="px-2 py-1.5 font-semibold">
                          Units
                        </th>
                        <th scope="col" className={`${num} font-semibold`}>
                          Capital with on-costs
                        </th>
                        <th scope="col" className={`${num} font-semibold`}>
                          Pupils
                        </th>
                        <th scope="col" className={`${num} font-semibold`}>
                          Pupil-hours a year
                        </th>
                        <th scope="col" className={`${num} font-semibold`}>
                          kgCO2e a year
                        </th>
                        <th scope="col" className={`${num} font-semibold`}>
                          £ a year
                        </th>
                        {view.canEdit && (
                          <th scope="col" className="px-2 py-1.5 font-semibold">
                            Change
                          </th>
                        )}
                      </tr>
                    </thead>
                    <tbody>
                      {w.schools.map((s) => (
                        <SchoolRows key={s.schoolId} visit={s} view={view} busy={busy} onEdit={edit} />
                      ))}
                    </tbody>
                  </table>
                </section>
              ))
          )}
        </details>
      ))}

      <section className="mt-8" aria-labelledby="misses-heading">
        <h2 id="misses-heading" className="text-xl font-semibold">
          Rooms that miss the programme, and why
        </h2>
        {report.misses.length === 0 ? (
          <p className="mt-2 text-sm">Every room with recommended units is in the programme.</p>
        ) : (
          <section
            className="mt-2 max-h-[32rem] overflow-auto rounded-card border border-line bg-surface"
            tabIndex={0}
            aria-label="Rooms not in the programme"
          >
            <table className="w-full text-left text-sm" data-testid="misses">
              <thead className="sticky top-0 border-b border-line bg-surface text-ink-muted">
                <tr>
                  <th scope="col" className="px-2 py-1.5 font-semibold">
                    Room
                  </th>
                  <th scope="col" className={`${num} font-semibold`}>
                    Pupil-hours a year
                  </th>
                  <th scope="col" className="px-2 py-1.5 font-semibold">
                    Why not
                  </th>
                  {view.canEdit && (
                    <th scope="col" className="px-2 py-1.5 font-semibold">
                      Change
                    </th>
                  )}
                </tr>
              </thead>
              <tbody>
                {report.misses.slice(0, 300).map((m: MissLine) => (
                  <tr key={m.roomId} className="border-b border-line align-top">
                    <th scope="row" className="px-2 py-1.5 font-normal">
                      <a className="underline" href={`/app/rooms/${m.roomId}`}>
                        {m.roomCode}
                      </a>{' '}
                      {m.roomName}
                      <span className="block text-xs text-ink-muted">{m.schoolName}</span>
                    </th>
                    <td className={num}>{formatInteger(m.pupilHoursRemovedPerYear)}</td>
                    <td className="px-2 py-1.5">{m.words}</td>
                    {view.canEdit && (
                      <td className="px-2 py-1.5">
                        {m.reason === 'kept_out' ? (
                          <button
                            type="button"
                            className={button}
                            disabled={busy}
                            onClick={() => edit({ action: 'release', roomId: m.roomId })}
                          >
                            Let it back in
                          </button>
                        ) : m.reason === 'not_funded' || m.reason === 'costs_more_than_budget' ? (
                          <button
                            type="button"
                            className={button}
                            disabled={busy}
                            onClick={() => edit({ action: 'force_in', roomId: m.roomId })}
                          >
                            Force in
                          </button>
                        ) : null}
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
            {report.misses.length > 300 && (
              <p className="p-2 text-sm text-ink-muted">
                The first 300 of {formatInteger(report.misses.length)}; the .xlsx has them all.
              </p>
            )}
          </section>
        )}
      </section>
    </div>
  );
}

function SchoolRows({
  visit,
  view,
  busy,
  onEdit,
}: {
  visit: SchoolVisit;
  view: View;
  busy: boolean;
  onEdit: (e: ProgrammeEditRequest) => void;
}) {
  return (
    <>
      <tr className="border-b border-line bg-canvas">
        <th scope="rowgroup" colSpan={2} className="px-2 py-1.5 font-semibold">
          {visit.schoolName}
          {visit.mobilisation ? (
            <span className="ml-2 text-xs font-normal text-ink-muted">
              one visit, mobilisation {formatGbp(visit.mobilisation.chargedGbp)}
            </span>
          ) : (
            <span className="ml-2 text-xs font-normal text-ink-muted">
              joins a heating project (no visit of its own)
            </span>
          )}
        </th>
        <td className={`${num} font-semibold`}>{formatGbp(visit.totals.capitalGbp)}</td>
        <td className={`${num} font-semibold`}>{formatInteger(visit.totals.pupils)}</td>
        <td className={`${num} font-semibold`}>{formatInteger(visit.totals.pupilHoursRemovedPerYear)}</td>
        <td className={`${num} font-semibold`}>{formatInteger(visit.totals.annualSavingKgCo2e)}</td>
        <td className={`${num} font-semibold`}>{formatGbp(visit.totals.annualSavingGbp)}</td>
        {view.canEdit && <td />}
      </tr>
      {visit.rooms.map((r) => (
        <RoomRow key={r.roomId} room={r} view={view} busy={busy} onEdit={onEdit} />
      ))}
    </>
  );
}

function RoomRow({
  room: r,
  view,
  busy,
  onEdit,
}: {
  room: RoomLine;
  view: View;
  busy: boolean;
  onEdit: (e: ProgrammeEditRequest) => void;
}) {
  const [year, setYear] = useState(r.year);
  return (
    <tr className="border-b border-line align-top" data-testid="programme-room" data-room-code={r.roomCode}>
      <th scope="row" className="px-2 py-1.5 pl-5 font-normal">
        <a className="underline" href={`/app/rooms/${r.roomId}`}>
          {r.roomCode}
        </a>{' '}
        {r.roomName}
        {r.pinned && (
          <span className="ml-1 rounded-control border border-brand px-1 text-xs font-semibold text-brand-strong">
            pinned
          </span>
        )}
        {r.forcedIn && (
          <span className="ml-1 rounded-control border border-brand px-1 text-xs font-semibold text-brand-strong">
            forced in
          </span>
        )}
        {r.joinsHeating && (
          <span className="ml-1 rounded-control border border-accent px-1 text-xs font-semibold text-accent">
            with heating
          </span>
        )}
        {r.blockName && <span className="block text-xs text-ink-muted">{r.blockName}</span>}
      </th>
      <td className="px-2 py-1.5">{r.unitsLabel}</td>
      <td className={num}>{formatGbp(r.capital.chargedGbp)}</td>
      <td className={num}>{formatInteger(r.pupils)}</td>
      <td className={num}>{formatInteger(r.pupilHoursRemovedPerYear)}</td>
      <td className={num}>{formatInteger(r.annualSavingKgCo2e)}</td>
      <td className={num}>{formatGbp(r.annualSavingGbp)}</td>
      {view.canEdit && (
        <td className="px-2 py-1.5">
          <div className="flex flex-wrap items-center gap-1">
            <label className="sr-only" htmlFor={`move-${r.roomId}`}>
              Year for {r.roomCode}
            </label>
            <select
              id={`move-${r.roomId}`}
              className="rounded-control border border-line bg-canvas px-1 py-0.5 text-xs"
              value={year}
              onChange={(e) => setYear(Number(e.target.value))}
              data-testid="move-year"
            >
              {view.yearLabels.map((label, i) => (
                <option key={label} value={i + 1}>
                  {label}
                </option>
              ))}
            </select>
            <button
              type="button"
              className={button}
              disabled={busy}
              onClick={() => onEdit({ action: 'pin', roomId: r.roomId, year, windowId: null })}
              data-testid="pin-room"
            >
              {year === r.year ? 'Pin here' : 'Move and pin'}
            </button>
            {r.pinned && (
              <button
                type="button"
                className={button}
                disabled={busy}
                onClick={() => onEdit({ action: 'unpin', roomId: r.roomId })}
              >
                Unpin
              </button>
            )}
            <button
              type="button"
              className={button}
              disabled={busy}
              onClick={() => onEdit({ action: 'keep_out', roomId: r.roomId })}
            >
              Keep out
            </button>
          </div>
        </td>
      )}
    </tr>
  );
}
