/** Correct the winter window opening the model assumed, for one room (saved to the register through the room API). */
import { useState, type FormEvent } from 'react';
import { apiFetch } from '../../lib/client/api';
import { useHydrated } from '../use-hydrated';

export default function WindowOverride({ roomId, value }: { roomId: string; value: number | null }) {
  const hydrated = useHydrated();
  const [percent, setPercent] = useState(value === null ? '' : String(Math.round(value * 100)));
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function save(event: FormEvent, clear = false) {
    event.preventDefault();
    const next = clear || percent.trim() === '' ? null : Number(percent) / 100;
    if (next !== null && !(next >= 0 && next <= 1)) {
      setMessage('Enter a percentage from 0 (kept shut) to 100 (wide open).');
      return;
    }
    setBusy(true);
    try {
      await apiFetch(`/api/rooms/${roomId}`, { method: 'PATCH', body: { winterWindowOpenFraction: next } });
      window.location.reload();
    } catch (error) {
      setMessage(error instanceof Error ? error.message : String(error));
      setBusy(false);
    }
  }
  return (
    <form
      className="mt-3 flex flex-wrap items-end gap-2 text-sm"
      onSubmit={(e) => void save(e)}
      data-testid="window-override"
    >
      <label>
        <span className="block text-ink-muted">Winter window opening for this room (% of the openable area)</span>
        <input
          className="mt-1 w-24 rounded-control border border-line bg-surface px-2 py-1"
          inputMode="numeric"
          value={percent}
          onChange={(e) => setPercent(e.target.value)}
          placeholder="assumed"
        />
      </label>
      <button
        type="submit"
        disabled={!hydrated || busy}
        className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white disabled:opacity-60"
      >
        Save for this room
      </button>
      {value !== null && (
        <button
          type="button"
          disabled={!hydrated || busy}
          className="rounded-control border border-line px-3 py-1.5"
          onClick={(e) => void save(e, true)}
        >
          Use the default again
        </button>
      )}
      {message && (
        <p role="alert" className="basis-full text-danger">
          {message}
        </p>
      )}
    </form>
  );
}
