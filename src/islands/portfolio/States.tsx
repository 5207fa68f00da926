/** Loading, error and empty states shared by the portfolio islands. */
import type { ReactNode } from 'react';

/** Grey bars where content will be; announced once to screen readers. */
export function Skeleton({ lines = 6, label = 'Loading' }: { lines?: number; label?: string }) {
  return (
    <div role="status" aria-live="polite" className="space-y-2 p-4">
      <span className="sr-only">{label}…</span>
      {Array.from({ length: lines }, (_, i) => (
        <div key={i} className="h-5 animate-pulse rounded-control bg-line" style={{ width: `${90 - (i % 3) * 12}%` }} />
      ))}
    </div>
  );
}

/** What went wrong, in the server's words, with a way to try again. */
export function ErrorState({ message, onRetry }: { message: string; onRetry: () => void }) {
  return (
    <div role="alert" className="rounded-card border border-danger bg-danger-soft p-4 text-sm text-ink">
      <p className="font-semibold">This could not be loaded.</p>
      <p className="mt-1">{message}</p>
      <button
        type="button"
        onClick={onRetry}
        className="mt-3 rounded-control border border-line bg-surface px-3 py-1.5 font-semibold text-ink hover:bg-canvas"
      >
        Try again
      </button>
    </div>
  );
}

/** An empty result that says what to do next. */
export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-card border border-dashed border-line p-6 text-center">
      <p className="font-semibold">{title}</p>
      {children && <div className="mt-2 text-sm text-ink-muted">{children}</div>}
    </div>
  );
}
