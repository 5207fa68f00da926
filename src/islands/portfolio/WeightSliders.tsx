/** Three sliders for the ranking weights, the share each has of the score, and saving them for the trust. */
import type { Weights } from '../../lib/client/portfolio';
import { useHydrated } from '../use-hydrated';

interface Props {
  weights: Weights;
  savedWeights: Weights;
  isDefault: boolean;
  canSave: boolean;
  saving: boolean;
  saved: boolean;
  saveError: string | null;
  onChange: (w: Weights) => void;
  onSave: () => void;
}

const SLIDERS: { key: keyof Weights; label: string; help: string }[] = [
  { key: 'risk', label: 'Risk', help: 'pupil-hours a year above the CO₂ criterion' },
  { key: 'costEffectiveness', label: 'Cost-effectiveness', help: 'pupil-hours of poor air removed per £1,000' },
  { key: 'payback', label: 'Payback', help: 'years for energy savings to repay the units' },
];

const pct = (v: number) => `${Math.round(v * 100)} %`;

export function WeightSliders(props: Props) {
  const hydrated = useHydrated();
  const { weights } = props;
  const sum = weights.risk + weights.costEffectiveness + weights.payback;
  const changed = SLIDERS.some((s) => Math.abs(weights[s.key] - props.savedWeights[s.key]) > 1e-9);
  return (
    <section aria-labelledby="weights-heading" className="rounded-card border border-line bg-surface p-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="weights-heading" className="text-lg font-semibold">
          What matters most
        </h2>
        <p className="text-sm text-ink-muted">
          {changed
            ? 'Trying out new weights: the list below is re-ranked but nothing is saved.'
            : props.isDefault
              ? "Airtally's starting weights."
              : "The trust's saved weights."}
        </p>
      </div>
      <div className="mt-3 grid grid-cols-1 gap-4 md:grid-cols-3">
        {SLIDERS.map((s) => {
          const share = sum > 0 ? weights[s.key] / sum : 0;
          return (
            <div key={s.key}>
              <label htmlFor={`weight-${s.key}`} className="flex justify-between text-sm font-semibold">
                <span>{s.label}</span>
                <span className="tabular-nums" aria-hidden="true">
                  {pct(share)} of the score
                </span>
              </label>
              <input
                id={`weight-${s.key}`}
                type="range"
                min={0}
                max={100}
                step={5}
                value={Math.round(weights[s.key] * 100)}
                aria-valuetext={`${pct(weights[s.key])}, ${pct(share)} of the score`}
                aria-describedby={`weight-${s.key}-help`}
                className="mt-2 w-full accent-brand"
                onChange={(e) => props.onChange({ ...weights, [s.key]: Number(e.target.value) / 100 })}
              />
              <p id={`weight-${s.key}-help`} className="text-xs text-ink-muted">
                {s.help}
              </p>
            </div>
          );
        })}
      </div>
      {sum === 0 && (
        <p role="alert" className="mt-2 text-sm text-danger">
          Give at least one weight a value above 0.
        </p>
      )}
      <div className="mt-3 flex flex-wrap items-center gap-3 text-sm">
        {props.canSave ? (
          <button
            type="button"
            className="rounded-control bg-brand px-3 py-1.5 font-semibold text-surface disabled:opacity-50"
            disabled={!hydrated || !changed || sum === 0 || props.saving}
            onClick={props.onSave}
          >
            {props.saving ? 'Saving…' : "Save as the trust's weights"}
          </button>
        ) : (
          <span className="text-ink-muted">Only trust admins and estates managers can save weights for the trust.</span>
        )}
        <button
          type="button"
          className="font-semibold text-brand underline disabled:opacity-50 disabled:no-underline"
          disabled={!hydrated || !changed}
          onClick={() => props.onChange(props.savedWeights)}
        >
          Back to the saved weights
        </button>
        <span aria-live="polite">
          {props.saveError ? (
            <span className="text-danger">{props.saveError}</span>
          ) : props.saved ? (
            <span className="text-ok">Saved for the trust.</span>
          ) : null}
        </span>
      </div>
    </section>
  );
}
