import { useEffect, useState } from 'react';
import type { Option } from './types';

/** A table cell that turns into an input or a drop-down when clicked; commits on Enter or leaving it, Escape cancels. */
export function EditableCell(props: {
  value: string | number | null;
  kind: 'text' | 'number' | 'select';
  options?: Option[] | undefined;
  nullable?: boolean | undefined;
  editable: boolean;
  label: string;
  display?: string | undefined;
  onCommit: (value: string | number | null) => void;
}) {
  const { value, kind, options, editable, label, display, onCommit, nullable } = props;
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState(value === null ? '' : String(value));
  useEffect(() => setDraft(value === null ? '' : String(value)), [value]);
  const shown =
    display ??
    (value === null || value === ''
      ? '—'
      : kind === 'select'
        ? (options?.find((o) => o.value === value)?.label ?? String(value))
        : String(value));
  if (!editable) return <span>{shown}</span>;
  if (!editing) {
    return (
      <button
        type="button"
        className="w-full cursor-text rounded-control px-1 text-left hover:bg-brand-soft"
        aria-label={`Edit ${label}`}
        onClick={() => setEditing(true)}
      >
        {shown}
      </button>
    );
  }
  const finish = () => {
    setEditing(false);
    const text = draft.trim();
    // A plain number is sent as one; anything else typed in a number cell ("1.6 m2", "2700 mm", "SW", "20 %") is sent
    // as typed and read by the server with the import's own cell readers, so a cell accepts what a file does.
    const plain = /^[-+]?\d+([.,]\d+)?$/.test(text) ? Number(text.replace(',', '.')) : null;
    const next = text === '' ? null : kind === 'number' ? (plain ?? text) : draft;
    if (next === value || (next === null && value === null)) return;
    if (next === null && !nullable && kind !== 'text') return;
    onCommit(kind === 'text' && next === null ? '' : next);
  };
  const common = {
    'aria-label': label,
    autoFocus: true,
    className: 'w-full min-w-16 rounded-control border border-brand bg-surface px-1 py-0.5',
    onBlur: finish,
    onKeyDown: (e: React.KeyboardEvent) => {
      if (e.key === 'Enter') (e.target as HTMLElement).blur();
      if (e.key === 'Escape') {
        setDraft(value === null ? '' : String(value));
        setEditing(false);
      }
    },
  };
  if (kind === 'select') {
    return (
      <select {...common} value={draft} onChange={(e) => setDraft(e.target.value)}>
        {nullable && <option value="">—</option>}
        {options?.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    );
  }
  return (
    <input
      {...common}
      type={kind === 'number' ? 'text' : 'text'}
      inputMode={kind === 'number' ? 'decimal' : undefined}
      value={draft}
      onChange={(e) => setDraft(e.target.value)}
    />
  );
}
