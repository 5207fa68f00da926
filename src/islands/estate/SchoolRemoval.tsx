import { useId, useState } from 'react';
import { useHydrated } from '../use-hydrated';
import { removeSchool, schoolRemoval } from '../../lib/client/schools';
import { formatCount } from '../../lib/format';

type Impact = Awaited<ReturnType<typeof schoolRemoval>>;

/** Removes a school after saying what goes with it (its blocks, rooms, results, members' access) and asking to confirm. */
export function SchoolRemoval({ schoolId, schoolName }: { schoolId: string; schoolName: string }) {
  const id = useId();
  const ready = useHydrated();
  const [impact, setImpact] = useState<Impact | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const ask = async () => {
    setError(null);
    try {
      setImpact(await schoolRemoval(schoolId));
    } catch (e) {
      setError((e as Error).message);
    }
  };
  const confirm = async () => {
    setBusy(true);
    try {
      await removeSchool(schoolId);
      window.location.assign(`/app/schools?removed=${encodeURIComponent(schoolName)}`);
    } catch (e) {
      setError((e as Error).message);
      setBusy(false);
    }
  };

  return (
    <div>
      {!impact && (
        <button
          type="button"
          disabled={!ready}
          className="rounded-control border border-danger px-3 py-1.5 font-semibold text-danger disabled:opacity-50"
          onClick={() => void ask()}
        >
          Remove school
        </button>
      )}
      {error && (
        <p role="alert" className="mt-2 rounded-control bg-danger-soft p-2 text-sm text-danger">
          {error}
        </p>
      )}
      {impact && (
        <div
          role="alertdialog"
          aria-labelledby={`${id}-title`}
          aria-describedby={`${id}-what`}
          className="mt-3 max-w-2xl rounded-card border border-danger bg-surface p-4"
          data-testid="school-removal"
        >
          <h2 id={`${id}-title`} className="text-lg font-semibold">
            Remove {impact.name}?
          </h2>
          <div id={`${id}-what`} className="mt-1 space-y-1 text-sm">
            <p>These go with it and cannot be brought back:</p>
            <ul className="list-disc pl-5">
              <li>{formatCount(impact.blocks, 'block')}</li>
              <li>{formatCount(impact.rooms, 'room')}, with their monitor readings and calibrations</li>
              <li>the assessment results of {formatCount(impact.assessedRooms, 'room')}</li>
              {impact.limitedMembers > 0 && (
                <li>
                  access for {formatCount(impact.limitedMembers, 'member')} limited to this school (they keep any other
                  schools they have)
                </li>
              )}
            </ul>
            {impact.subscriptionChange && (
              <p role="status" data-testid="school-removal-subscription-change">
                <strong>Subscription: </strong>
                {impact.subscriptionChange}
              </p>
            )}
            <p className="text-ink-muted">Export the register first if you may need the rooms again.</p>
          </div>
          <div className="mt-3 flex gap-2">
            <button
              type="button"
              disabled={busy}
              className="rounded-control bg-danger px-3 py-1.5 font-semibold text-surface disabled:opacity-50"
              onClick={() => void confirm()}
            >
              Remove {impact.name}
            </button>
            <button
              type="button"
              className="rounded-control border border-line px-3 py-1.5"
              onClick={() => setImpact(null)}
            >
              Keep the school
            </button>
          </div>
        </div>
      )}
    </div>
  );
}
