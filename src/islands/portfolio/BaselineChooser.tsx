/** The finance lead chooses the baseline of the headline figures (an assumption: saving it makes a new version). */
import { useState } from 'react';
import { apiFetch } from '../../lib/client/api';
import { useHydrated } from '../use-hydrated';

const CHOICES = [
  ['today', "Today's operation as registered"],
  ['same_air_without_recovery', 'The same air without heat recovery (windows or the existing fans)'],
  ['simpler_option', 'The cheapest compliant option without heat recovery'],
] as const;

export default function BaselineChooser({ current, editable }: { current: string; editable: boolean }) {
  const hydrated = useHydrated();
  const [value, setValue] = useState(current);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function save() {
    setBusy(true);
    try {
      await apiFetch('/api/assumptions', {
        method: 'PATCH',
        body: {
          changes: [{ path: 'finance.headlineBaseline', value }],
          summary: 'Headline baseline chosen on the finance page',
        },
      });
      setMessage('Saved as a new assumption version. Re-run the assessment to apply it to the figures.');
    } catch (error) {
      setMessage(error instanceof Error ? error.message : String(error));
    } finally {
      setBusy(false);
    }
  }
  return (
    <div className="flex flex-wrap items-end gap-2 text-sm" data-testid="baseline-chooser">
      <label>
        <span className="block text-ink-muted">Headline figures against</span>
        <select
          className="mt-1 rounded-control border border-line bg-surface px-2 py-1"
          value={value}
          disabled={!editable || busy}
          onChange={(e) => setValue(e.target.value)}
        >
          {CHOICES.map(([code, words]) => (
            <option key={code} value={code}>
              {words}
            </option>
          ))}
        </select>
      </label>
      {editable && (
        <button
          type="button"
          disabled={!hydrated || busy || value === current}
          className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white disabled:opacity-60"
          onClick={() => void save()}
        >
          Use this baseline
        </button>
      )}
      {message && (
        <p role="status" className="basis-full">
          {message}
        </p>
      )}
    </div>
  );
}
