/** Calibrate a room's model from its readings, or revert to the uncalibrated model. */
import { useState } from 'react';
import { calibrateRoom, revertCalibration } from '../../lib/client/monitoring';
import { useHydrated } from '../use-hydrated';

export default function CalibrationPanel({
  roomId,
  label,
  canCalibrate,
}: {
  roomId: string;
  label: string | null;
  canCalibrate: boolean;
}) {
  const hydrated = useHydrated();
  const [current, setCurrent] = useState(label);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const act = async (what: 'calibrate' | 'revert') => {
    setBusy(true);
    setMessage(null);
    try {
      if (what === 'calibrate') {
        const { version } = await calibrateRoom(roomId);
        setCurrent(version.label);
        setMessage(
          `Model ${version.label}. ${version.fit.notes.join(' ')} Reload the page to see the calibrated predictions.`,
        );
      } else {
        await revertCalibration(roomId);
        setCurrent(null);
        setMessage(
          'Reverted: the model uses the register and the trust’s assumptions again. Reload the page to see it.',
        );
      }
    } catch (e) {
      setMessage((e as Error).message);
    } finally {
      setBusy(false);
    }
  };
  return (
    <div className="mt-3 text-sm" data-testid="calibration">
      <p>
        {current ? (
          <>
            The model of this room is <strong>{current}</strong>.
          </>
        ) : (
          'The model of this room is not calibrated: it uses the register and the trust’s assumptions.'
        )}
      </p>
      {canCalibrate && (
        <div className="mt-2 flex flex-wrap gap-3">
          <button
            type="button"
            className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white"
            disabled={!hydrated || busy}
            onClick={() => void act('calibrate')}
          >
            {current ? 'Calibrate again from the latest readings' : 'Calibrate the model from these readings'}
          </button>
          {current && (
            <button
              type="button"
              className="rounded-control border border-line px-3 py-1.5"
              disabled={!hydrated || busy}
              onClick={() => void act('revert')}
            >
              Revert to the uncalibrated model
            </button>
          )}
        </div>
      )}
      {message && (
        <p className="mt-2" role="status">
          {message}
        </p>
      )}
    </div>
  );
}
