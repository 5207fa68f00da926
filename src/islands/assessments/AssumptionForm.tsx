/**
 * The assumptions as forms: every value in the unit people use (a discount rate as 3.5 %, prices in p/kWh, times as
 * 09:00), its allowed range, source and status; tables as small editable tables. Values the member's role may not
 * change are shown, not offered. Before saving, a preview lists every change from → to.
 */
import { QueryClientProvider } from '@tanstack/react-query';
import { useMemo, useState, type ReactNode } from 'react';
import {
  assumptionChoices,
  assumptionLimit,
  checkTyped,
  choiceWords,
  displayUnit,
  fromDisplay,
  MONTH_NAMES,
  rangeInWords,
  toDisplay,
  type AssumptionLimit,
} from '../../lib/engine/assumption-limits';
import { label } from '../../lib/engine/vocabulary';
import { assessmentsQueryClient, useEditAssumptions } from '../../lib/client/assessments';
import { useHydrated } from '../use-hydrated';

/** One assumption as the page passes it. */
export interface FormEntry {
  path: string;
  label: string;
  unit: string;
  value: unknown;
  source: string;
  status: string;
  statusWords: string;
  kind: 'technical' | 'financial';
  flagged: boolean;
  note: string | null;
  editable: boolean;
}

interface Props {
  groups: { id: string; title: string; entries: FormEntry[] }[];
  /** Words for who may change each kind, e.g. "Estates manager or trust admin". */
  editorWords: Record<'technical' | 'financial', string>;
  anyEditable: boolean;
}

const STATUS_CLASS: Record<string, string> = {
  confirmed: 'border-band-1 text-band-1',
  secondary: 'border-brand text-brand',
  common_practice: 'border-line text-ink',
  from_memory: 'border-band-3 text-band-3',
};

/** Column words for the keys of table rows. */
const KEY_WORDS: Record<string, string> = {
  startMinute: 'Starts',
  endMinute: 'Ends',
  occupancyFraction: 'Pupils present',
  months: 'Months',
  schoolDays: 'School days',
  indoorTempC: 'Room temperature',
  windowOpenFractionOccupied: 'Windows open in lessons',
  windowOpenFractionEmpty: 'Windows open at breaks',
  meanLimitPpm: 'Daily-mean limit',
  maxLimitPpm: 'Maximum',
  maxMinutesCap: 'Minutes allowed above the maximum',
  specificFanPowerWPerLps: 'Specific fan power, W/(l/s)',
  heatRecoveryEfficiency: 'Heat recovery',
  balance: 'Fans',
  capitalBaseGbp: 'Capital per room, £',
  capitalGbpPerLps: 'Capital per l/s, £',
  annualMaintenanceGbp: 'Servicing a year, £',
  lifeYears: 'Life, years',
  extraRunHoursPerDay: 'Extra run hours a school day',
  summerMode: 'In summer',
  ceilingHeightM: 'Ceiling height, m',
  floorAreaPerPupilM2: 'Floor area per pupil, m²',
  adultsInTeachingRoom: 'Adults in a teaching room',
  glazingShareOfFloor: 'Glazing, share of floor',
  openableShareOfGlazing: 'Openable, share of glazing',
  windowType: 'Window type',
  glazingGValue: 'Glazing g-value',
  ventilationType: 'Ventilation',
  use: 'Room use',
  winter: 'Winter',
  mid: 'Spring and autumn',
  summer: 'Summer',
};
const MET_STEPS = ['1.0', '1.2', '1.4', '1.6', '2.0', '3.0', '4.0'];
/** Rows and columns in the order people expect (stored tables come back from the database in any key order). */
const ORDER = [...Object.keys(KEY_WORDS), 'winter', 'mid', 'summer'];
const byOrder = (a: string, b: string) => {
  const rank = (k: string) => {
    const last = k.split('.')[0]!;
    const i = ORDER.indexOf(last);
    return i < 0 ? ORDER.length : i;
  };
  return rank(a) - rank(b);
};

function keyWords(key: string, parent?: string): string {
  if (parent === 'monthlyMeanTempC' || parent === 'dailyRangeK' || parent === 'dayToDaySdK')
    return MONTH_NAMES[Number(key)] ?? key;
  if (parent === 'lpsByMet') return `${MET_STEPS[Number(key)] ?? key} met`;
  if (parent === 'windSpeedMs') return `Wind, ${(KEY_WORDS[key] ?? key).toLowerCase()}, m/s`;
  return KEY_WORDS[key] ?? choiceWords(key);
}

type Json = unknown;
const isObj = (x: Json): x is Record<string, Json> => typeof x === 'object' && x !== null && !Array.isArray(x);

function getIn(value: Json, rel: string): Json {
  if (rel === '') return value;
  let node = value;
  for (const part of rel.split('.')) node = (node as Record<string, Json>)?.[part];
  return node;
}

function setIn(value: Json, rel: string, leaf: Json): Json {
  if (rel === '') return leaf;
  const parts = rel.split('.');
  const copy = structuredClone(value) as Record<string, Json>;
  let node: Record<string, Json> = copy;
  for (const part of parts.slice(0, -1)) node = node[part] as Record<string, Json>;
  node[parts[parts.length - 1]!] = leaf;
  return copy;
}

/** A leaf being edited: its full path, the text shown, and the rule that checks it. */
interface Cell {
  full: string;
  rel: string;
  kind: 'number' | 'choice' | 'months' | 'uses';
  limit: AssumptionLimit | null;
  choices: readonly string[] | null;
}

/** The editable leaves of an entry (numbers with a declared range, coded texts, month lists, use lists). */
function cellsOf(entry: FormEntry): Cell[] {
  const out: Cell[] = [];
  const walk = (node: Json, rel: string) => {
    const full = rel ? `${entry.path}.${rel}` : entry.path;
    if (typeof node === 'number') {
      const limit = assumptionLimit(full);
      if (limit) out.push({ full, rel, kind: 'number', limit, choices: null });
      return;
    }
    if (typeof node === 'string') {
      const choices = assumptionChoices(full);
      if (choices) out.push({ full, rel, kind: 'choice', limit: null, choices });
      return;
    }
    if (Array.isArray(node)) {
      if (rel.endsWith('months')) {
        out.push({ full, rel, kind: 'months', limit: assumptionLimit(`${full}.0`), choices: null });
        return;
      }
      if (node.length > 0 && typeof node[0] === 'string' && assumptionChoices(`${full}.0`)) {
        out.push({ full, rel, kind: 'uses', limit: null, choices: assumptionChoices(`${full}.0`) });
        return;
      }
      for (const [i, item] of node.entries()) walk(item, rel ? `${rel}.${i}` : String(i));
      return;
    }
    if (isObj(node)) for (const [k, v] of Object.entries(node)) walk(v, rel ? `${rel}.${k}` : k);
  };
  walk(entry.value, '');
  return out;
}

const monthsText = (months: number[]) => months.map((m) => toDisplay(m, 'months')).join(', ');
function parseMonths(text: string): number[] | null {
  const parts = text
    .split(/[,\s]+/)
    .map((t) => t.trim())
    .filter(Boolean);
  const months = parts.map((p) => fromDisplay(p, 'months'));
  return months.length > 0 && months.every((m) => m !== null && m >= 1 && m <= 12) ? (months as number[]) : null;
}

function initialText(entry: FormEntry, cell: Cell): string {
  const v = getIn(entry.value, cell.rel);
  if (cell.kind === 'months') return monthsText(v as number[]);
  if (cell.kind === 'uses') return (v as string[]).join(',');
  if (cell.kind === 'choice') return String(v);
  return toDisplay(v as number, cell.limit?.display);
}

/** The value a cell's text stands for, or an error in words. */
function parseCell(entry: FormEntry, cell: Cell, text: string): { value: Json } | { error: string } {
  if (cell.kind === 'months') {
    const months = parseMonths(text);
    return months ? { value: months } : { error: 'Enter months such as Dec, Jan, Feb.' };
  }
  if (cell.kind === 'uses') return { value: text.split(',').filter(Boolean) };
  if (cell.kind === 'choice') return { value: text };
  const problem = checkTyped(text, cell.limit!, entry.unit);
  if (problem) return { error: problem };
  return { value: fromDisplay(text, cell.limit!.display) };
}

function shown(entry: FormEntry, cell: Cell, value: Json): string {
  if (cell.kind === 'months') return monthsText(value as number[]);
  if (cell.kind === 'uses') return (value as string[]).map((u) => label(u)).join(', ') || 'none';
  if (cell.kind === 'choice') return choiceWords(String(value));
  const unit = displayUnit(cell.limit?.display, entry.unit, cell.limit?.unit);
  return `${toDisplay(value as number, cell.limit?.display)}${unit ? ` ${unit}` : ''}`;
}

/** Words for where a cell sits inside its table, e.g. "Winter, school days". */
function cellWords(entry: FormEntry, rel: string): string {
  if (rel === '') return '';
  const parts = rel.split('.');
  const words: string[] = [];
  let node: Json = entry.value;
  parts.forEach((part, i) => {
    const parent = parts[i - 1];
    if (Array.isArray(node)) {
      const item = node[Number(part)];
      words.push(
        isObj(item)
          ? String(item.name ?? item.label ?? `${label(String(item.ageGroup ?? ''))} ${item.sex ?? ''}`.trim())
          : keyWords(part, parent),
      );
    } else words.push(keyWords(part, parent));
    node = isObj(node) || Array.isArray(node) ? (node as Record<string, Json>)[part] : undefined;
  });
  return words.join(', ');
}

function Input({
  entry,
  cell,
  text,
  error,
  disabled,
  onChange,
  labelText,
}: {
  entry: FormEntry;
  cell: Cell;
  text: string;
  error: string | null;
  disabled: boolean;
  onChange: (text: string) => void;
  labelText: string;
}) {
  const id = `a-${cell.full.replace(/[^a-zA-Z0-9]/g, '-')}`;
  const unit = cell.kind === 'number' ? displayUnit(cell.limit?.display, entry.unit, cell.limit?.unit) : '';
  const hint = cell.kind === 'number' && cell.limit ? `Allowed ${rangeInWords(cell.limit, entry.unit)}` : undefined;
  if (cell.kind === 'choice')
    return (
      <select
        id={id}
        aria-label={labelText}
        value={text}
        disabled={disabled}
        onChange={(e) => onChange(e.target.value)}
        className="w-full min-w-32 rounded-control border border-line bg-surface px-1.5 py-1 disabled:opacity-70"
      >
        {(cell.choices ?? []).map((c) => (
          <option key={c} value={c}>
            {choiceWords(c)}
          </option>
        ))}
      </select>
    );
  if (cell.kind === 'uses') {
    const chosen = new Set(text.split(',').filter(Boolean));
    return (
      <fieldset className="flex flex-wrap gap-x-4 gap-y-1" aria-label={labelText}>
        {(cell.choices ?? []).map((c) => (
          <label key={c} className="flex items-center gap-1.5 text-sm">
            <input
              type="checkbox"
              className="h-4 w-4 accent-brand"
              checked={chosen.has(c)}
              disabled={disabled}
              onChange={(e) => {
                const next = new Set(chosen);
                if (e.target.checked) next.add(c);
                else next.delete(c);
                onChange((cell.choices ?? []).filter((x) => next.has(x)).join(','));
              }}
            />
            {label(c)}
          </label>
        ))}
      </fieldset>
    );
  }
  return (
    <span className="inline-flex flex-col">
      <span className="inline-flex items-center gap-1">
        <input
          id={id}
          aria-label={labelText}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          title={hint}
          inputMode={cell.kind === 'number' && cell.limit?.display !== 'clock' ? 'decimal' : 'text'}
          value={text}
          disabled={disabled}
          onChange={(e) => onChange(e.target.value)}
          className={`w-24 rounded-control border bg-surface px-1.5 py-1 text-right tabular-nums disabled:opacity-70 ${error ? 'border-danger' : 'border-line'} ${cell.kind === 'months' ? 'w-40 text-left' : ''}`}
        />
        {unit && <span className="whitespace-nowrap text-xs text-ink-muted">{unit}</span>}
      </span>
      {error && (
        <span id={`${id}-error`} className="text-xs text-danger">
          {error}
        </span>
      )}
    </span>
  );
}

/** How an entry's cells are laid out: one field, a list of named values, or a grid of rows × columns. */
function Layout({
  entry,
  cells,
  render,
}: {
  entry: FormEntry;
  cells: Cell[];
  render: (cell: Cell, labelText: string) => ReactNode;
}) {
  if (cells.length === 0) return <p className="text-sm text-ink-muted">Shown for reference; not edited here.</p>;
  const first = cells[0]!;
  if (cells.length === 1 && (first.rel === '' || first.kind === 'uses')) return <>{render(first, entry.label)}</>;
  const depth = (c: Cell) => (c.rel === '' ? 0 : c.rel.split('.').length);
  const flat = cells.every((c) => depth(c) === 1);
  if (flat) {
    const monthly = Array.isArray(entry.value) && entry.value.length === 12;
    return (
      <div className={monthly ? 'overflow-x-auto' : ''}>
        <table className="text-sm">
          <tbody className={monthly ? 'flex' : ''}>
            {[...cells]
              .sort((a, b) => byOrder(a.rel, b.rel))
              .map((c) => {
                const words = keyWords(c.rel, entry.path.split('.').pop());
                return monthly ? (
                  <tr key={c.full} className="flex flex-col pr-1">
                    <th scope="col" className="px-1 text-left text-xs font-normal text-ink-muted">
                      {MONTH_NAMES[Number(c.rel)]}
                    </th>
                    <td className="px-1">{render(c, `${entry.label}, ${words}`)}</td>
                  </tr>
                ) : (
                  <tr key={c.full} className="border-b border-line last:border-0">
                    <th scope="row" className="py-1 pr-4 text-left font-normal">
                      {words}
                    </th>
                    <td className="py-1">{render(c, `${entry.label}, ${words}`)}</td>
                  </tr>
                );
              })}
          </tbody>
        </table>
      </div>
    );
  }
  // A grid: the first part of each path is the row, the rest the column.
  const rowKeys = [...new Set(cells.map((c) => c.rel.split('.')[0]!))].sort(byOrder);
  const columns = [...new Set(cells.map((c) => c.rel.split('.').slice(1).join('.')))].sort(byOrder);
  const byRel = new Map(cells.map((c) => [c.rel, c]));
  const columnWords = (col: string) => {
    const parts = col.split('.');
    return keyWords(parts[parts.length - 1]!, parts[parts.length - 2]);
  };
  return (
    <section className="overflow-x-auto" aria-label={entry.label} tabIndex={0}>
      <table className="text-sm">
        <thead>
          <tr className="border-b border-line text-left text-ink-muted">
            <th scope="col" className="py-1 pr-3 font-normal">
              <span className="sr-only">Row</span>
            </th>
            {columns.map((col) => (
              <th key={col} scope="col" className="px-1 py-1 text-xs font-normal">
                {columnWords(col)}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rowKeys.map((row) => {
            const rowWords = cellWords(entry, row);
            return (
              <tr key={row} className="border-b border-line last:border-0">
                <th scope="row" className="py-1 pr-3 text-left font-normal whitespace-nowrap">
                  {rowWords}
                </th>
                {columns.map((col) => {
                  const cell = byRel.get(col ? `${row}.${col}` : row);
                  return (
                    <td key={col} className="px-1 py-1 align-top">
                      {cell ? render(cell, `${entry.label}, ${rowWords}, ${columnWords(col)}`) : '—'}
                    </td>
                  );
                })}
              </tr>
            );
          })}
        </tbody>
      </table>
    </section>
  );
}

function Form({ groups, editorWords, anyEditable }: Props) {
  const hydrated = useHydrated();
  const entries = useMemo(() => groups.flatMap((g) => g.entries), [groups]);
  const cellsByEntry = useMemo(() => new Map(entries.map((e) => [e.path, cellsOf(e)])), [entries]);
  const initial = useMemo(() => {
    const texts: Record<string, string> = {};
    for (const e of entries) for (const c of cellsByEntry.get(e.path) ?? []) texts[c.full] = initialText(e, c);
    return texts;
  }, [entries, cellsByEntry]);
  const [texts, setTexts] = useState<Record<string, string>>(initial);
  const [summary, setSummary] = useState('');
  const save = useEditAssumptions();

  // Every changed cell, parsed; errors block saving.
  const changes: { entry: FormEntry; cell: Cell; from: string; to: string }[] = [];
  const errors = new Map<string, string>();
  const values = new Map<string, Json>();
  for (const e of entries) {
    let value = e.value;
    let changed = false;
    for (const c of cellsByEntry.get(e.path) ?? []) {
      const text = texts[c.full] ?? '';
      if (text === initial[c.full]) continue;
      const parsed = parseCell(e, c, text);
      if ('error' in parsed) {
        errors.set(c.full, parsed.error);
        continue;
      }
      const before = getIn(e.value, c.rel);
      if (JSON.stringify(before) === JSON.stringify(parsed.value)) continue;
      value = setIn(value, c.rel, parsed.value);
      changed = true;
      changes.push({ entry: e, cell: c, from: shown(e, c, before), to: shown(e, c, parsed.value) });
    }
    if (changed) values.set(e.path, value);
  }

  function submit() {
    save.mutate(
      {
        changes: [...values.entries()].map(([path, value]) => ({ path, value })),
        ...(summary.trim() ? { summary: summary.trim() } : {}),
      },
      { onSuccess: () => window.location.reload() },
    );
  }

  return (
    <div data-testid="assumption-form">
      {groups.map((g) => (
        <section
          key={g.id}
          className="mt-6 rounded-card border border-line bg-surface p-5"
          aria-labelledby={`g-${g.id}`}
          data-testid={`assumptions-${g.id}`}
        >
          <h2 id={`g-${g.id}`} className="text-lg font-semibold">
            {g.title}
          </h2>
          <div className="mt-2 divide-y divide-line">
            {g.entries.map((e) => {
              const cells = cellsByEntry.get(e.path) ?? [];
              return (
                <div
                  key={e.path}
                  className={`grid gap-2 py-3 lg:grid-cols-[minmax(0,22rem)_1fr] ${e.flagged ? 'bg-caution-bg px-2' : ''}`}
                  data-path={e.path}
                >
                  <div className="text-sm">
                    <p className="font-semibold">
                      {e.label}
                      {e.flagged && (
                        <span className="ml-2 rounded-control bg-caution-ink px-1.5 text-xs font-semibold text-caution-bg">
                          Flagged
                        </span>
                      )}
                    </p>
                    <p className="mt-1 flex flex-wrap items-center gap-2 text-xs">
                      <span
                        className={`rounded-control border px-1.5 py-0.5 font-semibold ${STATUS_CLASS[e.status] ?? ''}`}
                      >
                        {e.statusWords}
                      </span>
                      <span className="text-ink-muted">
                        {e.editable ? 'You can change this' : `Changed by: ${editorWords[e.kind]}`}
                      </span>
                    </p>
                    <p className="mt-1 text-xs text-ink-muted">Source: {e.source}</p>
                    {e.note && <p className="mt-1 text-xs text-ink-muted">{e.note}</p>}
                  </div>
                  <div className="min-w-0">
                    <Layout
                      entry={e}
                      cells={cells}
                      render={(cell, labelText) =>
                        e.editable ? (
                          <Input
                            entry={e}
                            cell={cell}
                            text={texts[cell.full] ?? ''}
                            error={errors.get(cell.full) ?? null}
                            disabled={!hydrated || save.isPending}
                            labelText={labelText}
                            onChange={(text) => setTexts((t) => ({ ...t, [cell.full]: text }))}
                          />
                        ) : (
                          <span className="tabular-nums">{shown(e, cell, getIn(e.value, cell.rel))}</span>
                        )
                      }
                    />
                  </div>
                </div>
              );
            })}
          </div>
        </section>
      ))}

      {anyEditable && (
        <section
          className={`${changes.length > 0 || errors.size > 0 ? 'sticky bottom-0 z-10 shadow-lg' : ''} mt-6 rounded-card border border-brand bg-surface p-4`}
          aria-labelledby="preview-heading"
          data-testid="assumption-preview"
        >
          <h2 id="preview-heading" className="font-semibold">
            {changes.length === 0
              ? 'No changes yet'
              : `${changes.length} ${changes.length === 1 ? 'change' : 'changes'} to save as a new version`}
          </h2>
          {changes.length > 0 && (
            <ul className="mt-2 max-h-40 overflow-y-auto text-sm" data-testid="preview-changes">
              {changes.map((c) => (
                <li key={c.cell.full}>
                  <strong>{c.entry.label}</strong>
                  {c.cell.rel ? `, ${cellWords(c.entry, c.cell.rel)}` : ''}: {c.from} → <strong>{c.to}</strong>
                </li>
              ))}
            </ul>
          )}
          {errors.size > 0 && (
            <p role="alert" className="mt-2 text-sm text-danger">
              {errors.size === 1 ? 'One value needs' : `${errors.size} values need`} correcting before saving (marked in
              red).
            </p>
          )}
          {changes.length > 0 && (
            <p className="mt-2 text-xs text-ink-muted">
              Saving makes a new version; results change when the assessment is next run, and every run records the
              version it used.
            </p>
          )}
          <div className="mt-2 flex flex-wrap items-end gap-3">
            <label className="min-w-64 flex-1 text-sm">
              <span className="block text-ink-muted">Why (recorded with the version)</span>
              <input
                name="summary"
                value={summary}
                maxLength={500}
                onChange={(e) => setSummary(e.target.value)}
                className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
              />
            </label>
            <button
              type="button"
              onClick={submit}
              disabled={!hydrated || save.isPending || changes.length === 0 || errors.size > 0}
              className="rounded-control bg-brand px-4 py-1.5 text-sm font-semibold text-white disabled:opacity-60"
            >
              {save.isPending ? 'Saving…' : 'Save as a new version'}
            </button>
            {changes.length > 0 && (
              <button
                type="button"
                disabled={!hydrated || save.isPending}
                onClick={() => setTexts(initial)}
                className="rounded-control border border-line px-3 py-1.5 text-sm font-semibold disabled:opacity-60"
              >
                Undo all changes
              </button>
            )}
          </div>
          {save.error && (
            <p role="alert" className="mt-2 text-sm text-danger">
              {save.error.message}
            </p>
          )}
        </section>
      )}
    </div>
  );
}

export default function AssumptionForm(props: Props) {
  return (
    <QueryClientProvider client={assessmentsQueryClient()}>
      <Form {...props} />
    </QueryClientProvider>
  );
}
