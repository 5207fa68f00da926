/** Change one assumption at a time (only those the person's role may edit); saving makes a new version. */
import { QueryClientProvider } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { assessmentsQueryClient, useEditAssumptions } from '../../lib/client/assessments';

interface Editable {
  path: string;
  label: string;
  unit: string;
  kind: 'technical' | 'financial';
  /** The current value as JSON text. */
  valueJson: string;
}

interface Props {
  editable: Editable[];
}

function Editor({ editable }: Props) {
  const [path, setPath] = useState(editable[0]?.path ?? '');
  const selected = editable.find((e) => e.path === path);
  const [text, setText] = useState(selected?.valueJson ?? '');
  const [summary, setSummary] = useState('');
  const [parseError, setParseError] = useState<string | null>(null);
  const save = useEditAssumptions();

  function choose(next: string) {
    setPath(next);
    setText(editable.find((e) => e.path === next)?.valueJson ?? '');
    setParseError(null);
    save.reset();
  }

  function submit(event: FormEvent) {
    event.preventDefault();
    let value: unknown;
    try {
      value = JSON.parse(text);
    } catch {
      setParseError('Enter a number, "quoted text", or the table in the same form as shown.');
      return;
    }
    setParseError(null);
    save.mutate(
      { changes: [{ path, value }], ...(summary.trim() ? { summary: summary.trim() } : {}) },
      { onSuccess: () => window.location.reload() },
    );
  }

  if (editable.length === 0)
    return <p className="text-sm text-ink-muted">Your role can read the assumptions but not change them.</p>;
  const multiline = text.length > 40 || text.includes('{') || text.includes('[');
  return (
    <form onSubmit={submit} className="grid gap-3" data-testid="assumption-editor">
      <label className="text-sm">
        <span className="block text-ink-muted">Assumption</span>
        <select
          name="path"
          value={path}
          onChange={(e) => choose(e.target.value)}
          className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1.5"
        >
          {editable.map((e) => (
            <option key={e.path} value={e.path}>{`${e.label} (${e.kind})`}</option>
          ))}
        </select>
      </label>
      <div className="text-sm">
        <label htmlFor="assumption-new-value" className="block text-ink-muted">
          New value{selected ? ` (${selected.unit})` : ''}
        </label>
        {multiline ? (
          <textarea
            id="assumption-new-value"
            name="value"
            rows={6}
            value={text}
            onChange={(e) => setText(e.target.value)}
            className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1 font-mono text-xs"
          />
        ) : (
          <input
            id="assumption-new-value"
            name="value"
            value={text}
            onChange={(e) => setText(e.target.value)}
            className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
          />
        )}
      </div>
      <label className="text-sm">
        <span className="block text-ink-muted">Why (recorded with the version)</span>
        <input
          name="summary"
          value={summary}
          onChange={(e) => setSummary(e.target.value)}
          maxLength={500}
          className="mt-1 w-full rounded-control border border-line bg-surface px-2 py-1"
        />
      </label>
      <div>
        <button
          type="submit"
          disabled={save.isPending}
          className="rounded-control bg-brand px-4 py-1.5 text-sm font-semibold text-white disabled:opacity-60"
        >
          Save as a new version
        </button>
      </div>
      {(parseError ?? save.error?.message) && (
        <p role="alert" className="text-sm text-danger">
          {parseError ?? save.error?.message}
        </p>
      )}
    </form>
  );
}

export default function AssumptionEditor(props: Props) {
  return (
    <QueryClientProvider client={assessmentsQueryClient}>
      <Editor {...props} />
    </QueryClientProvider>
  );
}
