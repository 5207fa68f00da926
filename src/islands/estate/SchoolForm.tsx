import { type FormEvent, useId, useState } from 'react';
import { useHydrated } from '../use-hydrated';
import { addSchool, changeBlockPlantYear, changeSchool, type SchoolInput } from '../../lib/client/schools';
import type { Option } from '../register/types';

/** The choices the form offers, with the words people read. */
export interface SchoolFormOptions {
  phases: Option[];
  climateRegions: Option[];
  heatingFuels: Option[];
}

/** A block whose heating plant year the edit form can set. */
export interface PlantBlock {
  id: string;
  name: string;
  heatingInstalledYear: number | null;
}

const EMPTY: SchoolInput = {
  name: '',
  referenceNumber: null,
  phase: 'primary',
  climateRegion: 'midlands',
  address: null,
  heatingFuel: 'gas',
  fuelPriceGbpPerKwh: null,
  heatingEfficiency: null,
  timetable: '',
};

const FIELD = 'mt-1 block w-full rounded-control border border-line bg-surface px-2 py-1';

/** A labelled drop-down of options. */
function Choice(props: { label: string; value: string; options: Option[]; onChange: (value: string) => void }) {
  return (
    <label className="text-sm">
      {props.label}
      <select className={FIELD} value={props.value} onChange={(e) => props.onChange(e.target.value)}>
        {props.options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}

/** A number typed in a form field: blank is unknown (null); a comma may be the decimal mark. */
const numberOrNull = (text: string) => (text.trim() === '' ? null : Number(text.replace(',', '.')));

/**
 * Adds a school (a button that opens the form) or changes one, with everything the assessments use: phase, climate
 * region, heating fuel, price and efficiency, the school day, and each block's heating plant year.
 */
export function SchoolForm({
  mode,
  schoolId,
  initial,
  blocks = [],
  options,
  subscriptionNotice = null,
}: {
  mode: 'add' | 'edit';
  schoolId?: string;
  initial?: SchoolInput;
  blocks?: PlantBlock[];
  options: SchoolFormOptions;
  /** What adding the school does to the subscription, in words (billing's schoolCountNotice), shown before saving. */
  subscriptionNotice?: string | null;
}) {
  const id = useId();
  const ready = useHydrated();
  const [open, setOpen] = useState(false);
  const [values, setValues] = useState<SchoolInput>(initial ?? EMPTY);
  // The price is typed in pence per kWh, as bills show it; the API takes pounds.
  const [pence, setPence] = useState(
    initial?.fuelPriceGbpPerKwh == null ? '' : String(Math.round(initial.fuelPriceGbpPerKwh * 100_000) / 1000),
  );
  const [efficiency, setEfficiency] = useState(
    initial?.heatingEfficiency == null ? '' : String(initial.heatingEfficiency),
  );
  const [plantYears, setPlantYears] = useState<Record<string, string>>(
    Object.fromEntries(
      blocks.map((b) => [b.id, b.heatingInstalledYear === null ? '' : String(b.heatingInstalledYear)]),
    ),
  );
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const set = <K extends keyof SchoolInput>(key: K, value: SchoolInput[K]) =>
    setValues((v) => ({ ...v, [key]: value }));

  const submit = async (event: FormEvent) => {
    event.preventDefault();
    setError(null);
    const price = numberOrNull(pence);
    const eff = numberOrNull(efficiency);
    if ((price !== null && Number.isNaN(price)) || (eff !== null && Number.isNaN(eff))) {
      setError('Fuel price and heating efficiency must be numbers (or left blank for the trust’s values).');
      return;
    }
    const input: SchoolInput = {
      ...values,
      referenceNumber: values.referenceNumber?.trim() || null,
      address: values.address?.trim() || null,
      fuelPriceGbpPerKwh: price === null ? null : price / 100,
      heatingEfficiency: eff,
    };
    setSaving(true);
    try {
      if (mode === 'add') {
        const created = await addSchool(input);
        window.location.assign(`/app/schools/${created}`);
        return;
      }
      if (!schoolId) return;
      // Only what changed, so the audit trail says what was edited.
      const changed = (Object.keys(input) as (keyof SchoolInput)[]).filter((k) => input[k] !== initial?.[k]);
      if (changed.length > 0) await changeSchool(schoolId, Object.fromEntries(changed.map((k) => [k, input[k]])));
      for (const b of blocks) {
        const year = numberOrNull(plantYears[b.id] ?? '');
        if (year !== b.heatingInstalledYear) await changeBlockPlantYear(b.id, year);
      }
      window.location.reload();
    } catch (e) {
      setError((e as Error).message);
      setSaving(false);
    }
  };

  if (!open)
    return (
      <button
        type="button"
        disabled={!ready}
        className={
          mode === 'add'
            ? 'rounded-control bg-brand px-3 py-1.5 font-semibold text-white disabled:opacity-50'
            : 'rounded-control border border-line bg-surface px-3 py-1.5 font-semibold disabled:opacity-50'
        }
        onClick={() => setOpen(true)}
      >
        {mode === 'add' ? 'Add a school' : 'Edit school'}
      </button>
    );

  const field = FIELD;
  return (
    <form
      onSubmit={(e) => void submit(e)}
      aria-labelledby={`${id}-title`}
      className="mt-3 max-w-2xl space-y-3 rounded-card border border-line bg-surface p-4"
      data-testid="school-form"
    >
      <h2 id={`${id}-title`} className="text-lg font-semibold">
        {mode === 'add' ? 'Add a school' : `Edit ${initial?.name ?? 'school'}`}
      </h2>
      {error && (
        <p role="alert" className="rounded-control bg-danger-soft p-2 text-sm text-danger">
          Not saved: {error}
        </p>
      )}
      <div className="grid gap-3 sm:grid-cols-2">
        <label className="text-sm">
          School name
          <input
            required
            maxLength={200}
            className={field}
            value={values.name}
            onChange={(e) => set('name', e.target.value)}
          />
        </label>
        <label className="text-sm">
          Reference number (optional)
          <input
            maxLength={50}
            className={field}
            value={values.referenceNumber ?? ''}
            onChange={(e) => set('referenceNumber', e.target.value)}
          />
        </label>
        <Choice label="Phase" value={values.phase} options={options.phases} onChange={(v) => set('phase', v)} />
        <Choice
          label="Climate region"
          value={values.climateRegion}
          options={options.climateRegions}
          onChange={(v) => set('climateRegion', v)}
        />
        <label className="text-sm sm:col-span-2">
          Address and postcode (optional)
          <input
            maxLength={500}
            className={field}
            value={values.address ?? ''}
            onChange={(e) => set('address', e.target.value)}
          />
        </label>
        <Choice
          label="Heating fuel"
          value={values.heatingFuel}
          options={options.heatingFuels}
          onChange={(v) => set('heatingFuel', v)}
        />
        <label className="text-sm">
          Fuel price (p/kWh; blank: the trust’s)
          <input inputMode="decimal" className={field} value={pence} onChange={(e) => setPence(e.target.value)} />
        </label>
        <label className="text-sm">
          Heating efficiency (seasonal; heat pumps: COP; blank: the trust’s)
          <input
            inputMode="decimal"
            className={field}
            value={efficiency}
            onChange={(e) => setEfficiency(e.target.value)}
          />
        </label>
        <label className="text-sm sm:col-span-2">
          School day, one period a line (“08:50-10:00 lesson”; blank: the trust’s timetable)
          <textarea
            rows={4}
            className={`${field} font-mono`}
            value={values.timetable}
            onChange={(e) => set('timetable', e.target.value)}
          />
        </label>
      </div>
      {mode === 'edit' && blocks.length > 0 && (
        <fieldset className="text-sm">
          <legend className="font-semibold">Heating plant installed (year, per block)</legend>
          <div className="mt-1 grid gap-2 sm:grid-cols-3">
            {blocks.map((b) => (
              <label key={b.id}>
                <span className="sr-only">Heating plant year of block </span>
                {b.name}
                <input
                  inputMode="numeric"
                  className={field}
                  value={plantYears[b.id] ?? ''}
                  onChange={(e) => setPlantYears((y) => ({ ...y, [b.id]: e.target.value }))}
                />
              </label>
            ))}
          </div>
        </fieldset>
      )}
      {mode === 'add' && subscriptionNotice && (
        <p className="text-sm" role="status" data-testid="school-subscription-change">
          <strong>Subscription: </strong>
          {subscriptionNotice}
        </p>
      )}
      <div className="flex gap-2">
        <button
          type="submit"
          disabled={saving}
          className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white disabled:opacity-50"
        >
          {mode === 'add' ? 'Add the school' : 'Save changes'}
        </button>
        <button type="button" className="rounded-control border border-line px-3 py-1.5" onClick={() => setOpen(false)}>
          Cancel
        </button>
      </div>
    </form>
  );
}
