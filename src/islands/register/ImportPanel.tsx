import { useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import {
  commitRegisterImport,
  rejectedRowsUrl,
  uploadRegister,
  type ImportOutcome,
  type ImportPreview,
} from '../../lib/client/register';
import type { RegisterOptions } from './types';
import { formatCount } from '../../lib/format';

const SUMMARY_LABELS: [keyof ImportPreview['summary'], string][] = [
  ['schoolsToCreate', 'Schools to create'],
  ['blocksToCreate', 'Blocks to create'],
  ['roomsToCreate', 'Rooms to create'],
  ['roomsToChange', 'Rooms to change'],
  ['roomsUnchanged', 'Unchanged'],
  ['rowsRejected', 'Rows rejected'],
  ['rowsSkipped', 'Blank, total or note rows skipped'],
];

/** Upload → (header row and column mapping) → preview with every problem → commit the valid rows or nothing. */
export function ImportPanel({ options }: { options: RegisterOptions }) {
  const client = useQueryClient();
  const input = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [preview, setPreview] = useState<ImportPreview | null>(null);
  const [error, setError] = useState<{ message: string; topRows?: string[][] } | null>(null);
  const [mapping, setMapping] = useState<Record<string, string | null>>({});
  const [headerRow, setHeaderRow] = useState<number | undefined>(undefined);
  const [deleteMissing, setDeleteMissing] = useState(false);
  const [outcome, setOutcome] = useState<ImportOutcome | null>(null);
  const [showWarnings, setShowWarnings] = useState(true);
  const [dragging, setDragging] = useState(false);
  const [clearBlanks, setClearBlanks] = useState(false);
  const [schoolChoices, setSchoolChoices] = useState<SchoolChoices>({});

  const send = async (
    chosen: File,
    opts: { headerRow?: number | undefined; mapping?: Record<string, string | null>; schools?: SchoolChoices },
  ) => {
    if (preview) await commitRegisterImport(preview.id, 'none', false).catch(() => undefined);
    setPreview(null);
    setOutcome(null);
    setError(null);
    setProgress(0);
    try {
      const result = await uploadRegister(
        chosen,
        {
          ...(opts.headerRow ? { headerRow: opts.headerRow } : {}),
          ...(opts.mapping && Object.keys(opts.mapping).length ? { mapping: opts.mapping } : {}),
          ...(clearBlanks ? { clearBlanks: true } : {}),
          ...(opts.schools ? { schools: opts.schools } : {}),
        },
        setProgress,
      );
      setPreview(result);
      setHeaderRow(result.header.row);
      setDeleteMissing(false);
    } catch (e) {
      const err = e as { message: string; details?: unknown };
      const details = err.details as { topRows?: string[][] } | null | undefined;
      setError({ message: err.message, ...(details?.topRows ? { topRows: details.topRows } : {}) });
    } finally {
      setProgress(null);
      void client.invalidateQueries({ queryKey: ['register', 'imports'] });
    }
  };
  const choose = (chosen: File | undefined) => {
    if (!chosen) return;
    setFile(chosen);
    setMapping({});
    setSchoolChoices({});
    setHeaderRow(undefined);
    void send(chosen, {});
  };
  const finish = async (rows: 'valid' | 'none') => {
    if (!preview) return;
    try {
      const result = await commitRegisterImport(preview.id, rows, deleteMissing);
      setOutcome(result.outcome);
      setPreview(null);
      void client.invalidateQueries({ queryKey: ['register'] });
    } catch (e) {
      setError({ message: (e as Error).message });
    }
  };

  const problems = preview?.problems.filter((p) => showWarnings || p.severity === 'error') ?? [];
  const errors = preview?.summary.errors ?? 0;
  const fieldLabel = (field: string | null) => options.fields.find((f) => f.value === field)?.label ?? 'Not imported';
  // Codes as people read them ("natural_single_sided" → "Natural, single-sided").
  const codeLabels = new Map(
    [
      ...options.uses,
      ...options.ventilationTypes,
      ...options.ageGroups,
      ...options.windowTypes,
      ...options.frameMaterials,
      ...options.heatingFuels,
    ].map((o) => [o.value, o.label]),
  );
  const valueLabel = (value: string | number | null) =>
    typeof value === 'string' ? (codeLabels.get(value) ?? value) : String(value);

  return (
    <section aria-label="Import a register" className="space-y-4">
      {/* biome-ignore lint/a11y/noStaticElementInteractions: dropping is a pointer shortcut; the "choose a file" button inside is the keyboard path. */}
      <div
        className={`rounded-card border-2 border-dashed p-6 text-center ${dragging ? 'border-brand bg-brand-soft' : 'border-line bg-surface'}`}
        onDragOver={(e) => {
          e.preventDefault();
          setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={(e) => {
          e.preventDefault();
          setDragging(false);
          choose(e.dataTransfer.files[0]);
        }}
        data-testid="drop-zone"
      >
        <p className="font-semibold">Drop a register here (.xlsx or .csv, up to 20 MB)</p>
        <p className="mt-1 text-sm text-ink-muted">
          or{' '}
          <button type="button" className="text-brand underline" onClick={() => input.current?.click()}>
            choose a file
          </button>
          . Nothing changes until you confirm the preview.
        </p>
        <label className="mt-2 inline-flex items-center gap-2 text-sm">
          <input type="checkbox" checked={clearBlanks} onChange={(e) => setClearBlanks(e.target.checked)} />
          Blank cells clear stored values (otherwise a blank keeps what Airtally holds)
        </label>
        <input
          ref={input}
          type="file"
          accept=".xlsx,.csv,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
          className="sr-only"
          aria-label="Register file"
          data-testid="register-file"
          onChange={(e) => choose(e.target.files?.[0])}
        />
        {progress !== null && (
          <div className="mx-auto mt-4 max-w-md">
            <progress className="w-full" max={1} value={progress} aria-label="Upload progress" />
            <p className="text-sm text-ink-muted">
              {progress < 1 ? `Uploading ${Math.round(progress * 100)} %` : 'Reading and checking every row…'}
            </p>
          </div>
        )}
      </div>

      {error && (
        <div role="alert" className="rounded-card bg-danger-soft p-4 text-danger">
          <p>{error.message}</p>
          {error.topRows && file && (
            <HeaderPicker
              rows={error.topRows}
              onPick={(row) => {
                setHeaderRow(row);
                void send(file, { headerRow: row });
              }}
            />
          )}
        </div>
      )}

      {outcome && (
        <div role="status" className="rounded-card bg-brand-soft p-4" data-testid="import-outcome">
          {outcome.status === 'cancelled'
            ? 'Import cancelled; nothing was changed.'
            : `Imported: ${formatCount(outcome.roomsCreated, 'room')} created, ${outcome.roomsChanged} changed, ${outcome.roomsDeleted} deleted, ${formatCount(outcome.schoolsCreated, 'school')} and ${formatCount(outcome.blocksCreated, 'block')} created; ${formatCount(outcome.rowsRejected, 'row')} left out.`}
        </div>
      )}

      {preview && file && (
        <div className="space-y-4" data-testid="import-preview">
          <h3 className="text-lg font-semibold">
            Preview of {preview.fileName}{' '}
            {/* A CSV file has no sheets; a workbook's sheet is named as the workbook names it. */}
            {!/\.(csv|txt)$/i.test(preview.fileName) && (
              <span className="font-normal text-ink-muted">(sheet “{preview.sheetName}”)</span>
            )}
          </h3>
          <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-7">
            {SUMMARY_LABELS.map(([key, text]) => (
              <div key={key} className="rounded-card border border-line bg-surface p-3">
                <dt className="text-xs text-ink-muted">{text}</dt>
                <dd className="text-xl font-bold tabular-nums" data-testid={`summary-${key}`}>
                  {preview.summary[key]}
                </dd>
              </div>
            ))}
          </dl>

          {preview.subscriptionChange && (
            <p
              className="rounded-card border border-line bg-surface p-3 text-sm"
              role="status"
              data-testid="import-subscription-change"
            >
              <strong>Subscription: </strong>
              {preview.subscriptionChange.words}
            </p>
          )}

          <details
            open={!preview.header.confident || preview.header.columns.some((c) => !c.field)}
            className="rounded-card border border-line bg-surface p-4"
          >
            <summary className="cursor-pointer font-semibold">
              Header on row {preview.header.row}
              {preview.header.rowCount === 2 ? ` and ${preview.header.row + 1}` : ''} ·{' '}
              {preview.header.columns.filter((c) => c.field).length} columns recognised
              {!preview.header.confident && ' · please check'}
            </summary>
            {!preview.header.confident && (
              <HeaderPicker
                rows={preview.topRows}
                current={headerRow}
                onPick={(row) => {
                  setHeaderRow(row);
                  void send(file, { headerRow: row, mapping, schools: schoolChoices });
                }}
              />
            )}
            <table className="mt-3 text-sm">
              <caption className="sr-only">Column mapping</caption>
              <thead>
                <tr>
                  <th scope="col" className="px-2 text-left">
                    Column
                  </th>
                  <th scope="col" className="px-2 text-left">
                    Header in the file
                  </th>
                  <th scope="col" className="px-2 text-left">
                    Imported as
                  </th>
                </tr>
              </thead>
              <tbody>
                {preview.header.columns
                  .filter((c) => c.header !== '')
                  .map((c) => (
                    <tr key={c.letter}>
                      <td className="px-2">{c.letter}</td>
                      <td className="px-2">{c.header}</td>
                      <td className="px-2">
                        <select
                          aria-label={`Import column ${c.letter} (${c.header}) as`}
                          className={`rounded-control border px-2 py-0.5 ${c.field ? 'border-line' : 'border-accent'}`}
                          value={mapping[c.letter] === undefined ? (c.field ?? '') : (mapping[c.letter] ?? '')}
                          onChange={(e) => setMapping((m) => ({ ...m, [c.letter]: e.target.value || null }))}
                        >
                          <option value="">Not imported</option>
                          {options.fields.map((f) => (
                            <option key={f.value} value={f.value}>
                              {f.label}
                            </option>
                          ))}
                        </select>
                        {mapping[c.letter] === undefined && !c.field && (
                          <span className="ml-2 text-accent">not recognised</span>
                        )}
                      </td>
                    </tr>
                  ))}
              </tbody>
            </table>
            {Object.keys(mapping).length > 0 && (
              <button
                type="button"
                className="mt-3 rounded-control bg-brand px-3 py-1.5 font-semibold text-white"
                onClick={() => void send(file, { headerRow, mapping, schools: schoolChoices })}
              >
                Re-read with this mapping (remembered for next time)
              </button>
            )}
            <p className="mt-2 text-xs text-ink-muted">
              Mapped:{' '}
              {Object.entries(mapping)
                .map(([l, f]) => `${l} → ${fieldLabel(f)}`)
                .join(', ') || 'as detected'}
            </p>
          </details>

          {preview.newSchools.length > 0 && (
            <NewSchoolsList
              schools={preview.newSchools}
              options={options}
              onChoose={(choices) => {
                // Earlier choices stand; the new ones are added to them.
                const merged = { ...schoolChoices, ...choices };
                setSchoolChoices(merged);
                void send(file, { headerRow, mapping, schools: merged });
              }}
            />
          )}

          <div>
            <div className="flex items-center gap-4">
              <h4 className="font-semibold">
                {formatCount(preview.summary.errors, 'error')}, {formatCount(preview.summary.warnings, 'warning')}
              </h4>
              <label className="text-sm">
                <input type="checkbox" checked={showWarnings} onChange={(e) => setShowWarnings(e.target.checked)} />{' '}
                Show warnings
              </label>
            </div>
            {problems.length > 0 && (
              <div className="mt-2 max-h-96 overflow-auto rounded-card border border-line bg-surface">
                <table className="w-full text-left text-sm" data-testid="problems-table">
                  <caption className="sr-only">Problems by row and column</caption>
                  <thead className="sticky top-0 bg-surface text-ink-muted">
                    <tr>
                      <th scope="col" className="px-2 py-1">
                        Row
                      </th>
                      <th scope="col" className="px-2 py-1">
                        Column
                      </th>
                      <th scope="col" className="px-2 py-1">
                        Value
                      </th>
                      <th scope="col" className="px-2 py-1">
                        Problem
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {problems.slice(0, 2000).map((p, i) => (
                      <tr key={i} className="border-t border-line">
                        <td className="px-2 py-1 tabular-nums">{p.rows ? rowRanges(p.rows) : p.row}</td>
                        <td className="px-2 py-1">
                          {p.columnLetter ? `${p.columnLetter} · ` : ''}
                          {p.column}
                        </td>
                        <td className="px-2 py-1 font-mono">{p.value}</td>
                        <td className={`px-2 py-1 ${p.severity === 'error' ? 'text-danger' : 'text-caution-ink'}`}>
                          {p.severity === 'error' ? 'Error: ' : 'Warning: '}
                          {p.message}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            {preview.hasRejectedRows && (
              <p className="mt-2 text-sm">
                <a className="text-brand underline" href={rejectedRowsUrl(preview.id)} download>
                  Download the {formatCount(preview.summary.rowsRejected, 'rejected row')} as a workbook
                </a>{' '}
                with a column saying what to fix; fix them there and upload that workbook to import them.
              </p>
            )}
            {(problems.length > 2000 || preview.problemsTruncated) && (
              <p className="text-sm text-ink-muted">
                Showing the first problems only; fix these and upload again to see the rest.
              </p>
            )}
          </div>

          {preview.roomChanges.length > 0 && (
            <details className="rounded-card border border-line bg-surface p-4" data-testid="room-changes" open>
              <summary className="cursor-pointer font-semibold">
                What changes, room by room ({formatCount(preview.roomChanges.length, 'room')}
                {preview.roomChanges.length >= 2000 ? ', first 2,000' : ''})
              </summary>
              <p className="mt-1 text-sm text-ink-muted">
                {preview.clearBlanks
                  ? 'Blank cells clear the stored values (you chose to clear blanks).'
                  : 'Blank cells keep the stored values; "TBC" and "n/a" are read as blank.'}
              </p>
              <div className="mt-2 max-h-96 overflow-auto">
                <table className="w-full text-left text-sm">
                  <caption className="sr-only">Fields that change per room</caption>
                  <thead className="border-b border-line text-ink-muted">
                    <tr>
                      <th scope="col" className="px-2 py-1">
                        Row
                      </th>
                      <th scope="col" className="px-2 py-1">
                        Room
                      </th>
                      <th scope="col" className="px-2 py-1">
                        Changes
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {preview.roomChanges.slice(0, 500).map((c) => (
                      <tr key={`${c.row}-${c.code}`} className="border-b border-line align-top last:border-0">
                        <td className="px-2 py-1 tabular-nums">{c.row}</td>
                        <td className="px-2 py-1">
                          {c.school} · {c.code}
                          {c.kind === 'new' ? ' (new)' : ''}
                        </td>
                        <td className="px-2 py-1">
                          {c.fields
                            .map((f) =>
                              c.kind === 'new'
                                ? `${fieldLabel(f.field)} ${valueLabel(f.after)}`
                                : `${fieldLabel(f.field)}: ${f.before === null ? 'unknown' : valueLabel(f.before)} → ${f.after === null ? 'unknown' : valueLabel(f.after)}`,
                            )
                            .join('; ')}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </details>
          )}

          {preview.missingRooms.length > 0 && (
            <div className="rounded-card border border-line bg-surface p-4">
              <p className="font-semibold">
                {preview.missingRooms.length} rooms of these schools are in Airtally but not in the file
              </p>
              <p className="text-sm text-ink-muted">
                {preview.missingRooms
                  .slice(0, 30)
                  .map((r) => `${r.schoolName} ${r.code}`)
                  .join(', ')}
                {preview.missingRooms.length > 30 ? ', …' : ''}
              </p>
              <label className="mt-2 block text-sm">
                <input type="checkbox" checked={deleteMissing} onChange={(e) => setDeleteMissing(e.target.checked)} />{' '}
                Delete these {preview.missingRooms.length} rooms when importing
              </label>
            </div>
          )}

          <div className="flex flex-wrap gap-3">
            <button
              type="button"
              className="rounded-control bg-brand px-4 py-2 font-semibold text-white"
              onClick={() => void finish('valid')}
            >
              {errors > 0
                ? `Import the ${formatCount(preview.summary.roomsToCreate + preview.summary.roomsToChange, 'change')} from valid rows; leave out ${formatCount(preview.summary.rowsRejected, 'row')} with errors`
                : `Import ${formatCount(preview.summary.roomsToCreate + preview.summary.roomsToChange, 'change')}`}
            </button>
            <button
              type="button"
              className="rounded-control border border-line px-4 py-2"
              onClick={() => void finish('none')}
            >
              Cancel (change nothing)
            </button>
          </div>
        </div>
      )}
    </section>
  );
}

/** Phase and region chosen for new schools, by school name (as the upload's `schools` field takes them). */
type SchoolChoices = Record<string, { phase?: string; climateRegion?: string }>;

/** Row numbers in short: 4–9, 12, 15–16. */
function rowRanges(rows: readonly number[]): string {
  const parts: string[] = [];
  let start = rows[0] ?? 0;
  let previous = start;
  for (const row of [...rows.slice(1), Number.NaN]) {
    if (row === previous + 1) {
      previous = row;
      continue;
    }
    parts.push(start === previous ? String(start) : `${start}–${previous}`);
    start = row;
    previous = row;
  }
  return parts.join(', ');
}

const SOURCE_WORDS: Record<string, string> = {
  file: 'from the file',
  chosen: 'your choice',
  name: 'from its name',
  postcode: 'from its postcode',
  default: 'not known: please choose',
};

/** The schools the file creates, once each: phase and region as inferred, to confirm or choose before importing. */
function NewSchoolsList({
  schools,
  options,
  onChoose,
}: {
  schools: ImportPreview['newSchools'];
  options: RegisterOptions;
  onChoose: (choices: SchoolChoices) => void;
}) {
  const [draft, setDraft] = useState<SchoolChoices>(() =>
    Object.fromEntries(schools.map((s) => [s.name, { phase: s.phase, climateRegion: s.climateRegion }])),
  );
  const changed = schools.some(
    (s) => draft[s.name]?.phase !== s.phase || draft[s.name]?.climateRegion !== s.climateRegion,
  );
  const unknown = schools.filter((s) => s.phaseSource === 'default' || s.regionSource === 'default').length;
  return (
    <section
      aria-labelledby="new-schools-heading"
      className="rounded-card border border-line bg-surface p-4"
      data-testid="new-schools"
    >
      <h4 id="new-schools-heading" className="font-semibold">
        {formatCount(schools.length, 'new school')} in this file
      </h4>
      <p className="text-sm text-ink-muted">
        Airtally will create {schools.length === 1 ? 'this school' : 'these schools'}. Phase and climate region come
        from the file, the school’s name or its postcode where they say;{' '}
        {unknown > 0
          ? `${formatCount(unknown, 'school')} need${unknown === 1 ? 's' : ''} your choice (the trust’s usual values are used until you choose).`
          : 'check them, and change any that are wrong.'}
      </p>
      <table className="mt-2 w-full text-left text-sm">
        <caption className="sr-only">Schools the import creates</caption>
        <thead className="text-ink-muted">
          <tr>
            <th scope="col" className="px-2 py-1">
              School
            </th>
            <th scope="col" className="px-2 py-1">
              Rows
            </th>
            <th scope="col" className="px-2 py-1">
              Phase
            </th>
            <th scope="col" className="px-2 py-1">
              Climate region
            </th>
          </tr>
        </thead>
        <tbody>
          {schools.map((s) => (
            <tr key={s.key} className="border-t border-line align-top">
              <th scope="row" className="px-2 py-1 font-semibold">
                {s.name}
                {s.postcode && <div className="text-xs font-normal text-ink-muted">{s.postcode}</div>}
              </th>
              <td className="px-2 py-1 tabular-nums">
                {formatCount(s.rowCount, 'row')} from row {s.firstRow}
              </td>
              <td className="px-2 py-1">
                <select
                  aria-label={`Phase of ${s.name}`}
                  className={`rounded-control border px-2 py-0.5 ${s.phaseSource === 'default' ? 'border-accent' : 'border-line'}`}
                  value={draft[s.name]?.phase ?? s.phase}
                  disabled={s.phaseSource === 'file'}
                  onChange={(e) => setDraft((d) => ({ ...d, [s.name]: { ...d[s.name], phase: e.target.value } }))}
                >
                  {options.phases.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
                <div className="text-xs text-ink-muted">
                  {SOURCE_WORDS[s.phaseSource]}
                  {s.phaseSource === 'name' ? ` (${s.phaseReason.replace(/^the name says /, '')})` : ''}
                </div>
              </td>
              <td className="px-2 py-1">
                <select
                  aria-label={`Climate region of ${s.name}`}
                  className={`rounded-control border px-2 py-0.5 ${s.regionSource === 'default' ? 'border-accent' : 'border-line'}`}
                  value={draft[s.name]?.climateRegion ?? s.climateRegion}
                  onChange={(e) =>
                    setDraft((d) => ({ ...d, [s.name]: { ...d[s.name], climateRegion: e.target.value } }))
                  }
                >
                  {options.climateRegions.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
                <div className="text-xs text-ink-muted">
                  {SOURCE_WORDS[s.regionSource]}
                  {s.regionSource === 'postcode' ? ` (${s.regionReason})` : ''}
                </div>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <button
        type="button"
        className="mt-3 rounded-control bg-brand px-3 py-1.5 font-semibold text-white disabled:opacity-50"
        disabled={!changed}
        onClick={() =>
          // Only what the person changed: values the file, name or postcode gave keep saying where they came from.
          onChoose(
            Object.fromEntries(
              schools
                .filter((s) => draft[s.name]?.phase !== s.phase || draft[s.name]?.climateRegion !== s.climateRegion)
                .map((s) => [s.name, draft[s.name] ?? {}]),
            ),
          )
        }
      >
        Use these phases and regions
      </button>
    </section>
  );
}

/** Shows the file's first rows so a person can say which one holds the column names. */
function HeaderPicker({
  rows,
  current,
  onPick,
}: {
  rows: string[][];
  current?: number | undefined;
  onPick: (row: number) => void;
}) {
  return (
    <div className="mt-3 overflow-x-auto text-sm text-ink">
      <p className="font-semibold">Which row holds the column names?</p>
      <table className="mt-1">
        <tbody>
          {rows.map((cells, i) => (
            <tr key={i} className={current === i + 1 ? 'bg-brand-soft' : ''}>
              <td className="pr-2">
                <button
                  type="button"
                  className="rounded-control border border-line px-2"
                  onClick={() => onPick(i + 1)}
                  aria-label={`Use row ${i + 1} as the header`}
                >
                  Row {i + 1}
                </button>
              </td>
              <td className="whitespace-nowrap text-ink-muted">
                {cells.filter(Boolean).slice(0, 8).join(' · ') || '(blank)'}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
