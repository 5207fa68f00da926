/** Starts a trust-wide assessment, shows its progress, and reloads the page when the results are in. */
import { useState } from 'react';
import { runTrustAssessment } from '../../lib/client/portfolio';
import { useHydrated } from '../use-hydrated';

export default function RunAssessmentButton({ label = 'Run an assessment' }: { label?: string }) {
  const hydrated = useHydrated();
  const [state, setState] = useState<
    { kind: 'idle' } | { kind: 'running'; done: number; total: number } | { kind: 'failed'; message: string }
  >({ kind: 'idle' });
  const start = async () => {
    setState({ kind: 'running', done: 0, total: 0 });
    try {
      await runTrustAssessment((done, total) => setState({ kind: 'running', done, total }));
      window.location.reload();
    } catch (error) {
      setState({ kind: 'failed', message: error instanceof Error ? error.message : String(error) });
    }
  };
  return (
    <div className="flex flex-wrap items-center gap-3">
      <button
        type="button"
        className="rounded-control bg-brand px-3 py-1.5 font-semibold text-surface disabled:opacity-60"
        disabled={!hydrated || state.kind === 'running'}
        onClick={() => void start()}
      >
        {state.kind === 'running' ? 'Assessing…' : label}
      </button>
      <span aria-live="polite" className="text-sm">
        {state.kind === 'running' && state.total > 0 && (
          <>
            <progress
              className="mr-2 align-middle"
              max={state.total}
              value={state.done}
              aria-label="Assessment progress"
            />
            {state.done} of {state.total} rooms
          </>
        )}
        {state.kind === 'failed' && (
          <span role="alert" className="text-danger">
            {state.message} Try again, or ask your trust admin.
          </span>
        )}
      </span>
    </div>
  );
}
