import { useState } from 'react';
import { useCreateRoom } from '../../lib/client/register';
import type { RegisterOptions, SchoolOption } from './types';

/** A short form to add one room; the server checks it as it checks an imported row. */
export function AddRoomForm({
  schools,
  options,
  onDone,
}: {
  schools: SchoolOption[];
  options: RegisterOptions;
  onDone: (message: string) => void;
}) {
  const create = useCreateRoom();
  const [error, setError] = useState<string | null>(null);
  const [schoolId, setSchoolId] = useState(schools[0]?.id ?? '');
  const blocks = schools.find((s) => s.id === schoolId)?.blocks ?? [];
  const submit = (e: React.FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const num = (k: string) =>
      String(f.get(k) ?? '').trim() === '' ? undefined : Number(String(f.get(k)).replace(',', '.'));
    create.mutate(
      {
        schoolId,
        blockId: (f.get('blockId') as string) || null,
        code: String(f.get('code') ?? ''),
        name: String(f.get('name') ?? ''),
        use: f.get('use') as never,
        ageGroup: f.get('ageGroup') as never,
        ventilationType: f.get('ventilationType') as never,
        floorAreaM2: num('floorAreaM2') as number,
        ceilingHeightM: num('ceilingHeightM') as number,
        pupils: num('pupils') ?? 0,
        adults: num('adults') ?? 0,
        glazingAreaM2: num('glazingAreaM2') ?? 0,
        openableAreaM2: num('openableAreaM2') ?? 0,
      },
      {
        onError: (err) => setError(err.message),
        onSuccess: (r) =>
          onDone(`Room added.${r.warnings.length ? ` Check: ${r.warnings.map((w) => w.message).join(' ')}` : ''}`),
      },
    );
  };
  const field = 'rounded-control border border-line bg-surface px-2 py-1';
  return (
    <form
      onSubmit={submit}
      className="mt-3 grid gap-3 rounded-card border border-line bg-surface p-4 text-sm sm:grid-cols-3 lg:grid-cols-6"
      aria-label="Add a room"
    >
      <label>
        School
        <br />
        <select className={field} value={schoolId} onChange={(e) => setSchoolId(e.target.value)}>
          {schools.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </select>
      </label>
      <label>
        Block
        <br />
        <select className={field} name="blockId">
          <option value="">No block</option>
          {blocks.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </select>
      </label>
      <label>
        Room code
        <br />
        <input className={field} name="code" required />
      </label>
      <label>
        Room name
        <br />
        <input className={field} name="name" />
      </label>
      <label>
        Use
        <br />
        <select className={field} name="use">
          {options.uses.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </label>
      <label>
        Age group
        <br />
        <select className={field} name="ageGroup">
          {options.ageGroups.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </label>
      <label>
        Floor area (m²)
        <br />
        <input className={field} name="floorAreaM2" inputMode="decimal" required />
      </label>
      <label>
        Ceiling height (m)
        <br />
        <input className={field} name="ceilingHeightM" inputMode="decimal" required />
      </label>
      <label>
        Pupils
        <br />
        <input className={field} name="pupils" inputMode="numeric" />
      </label>
      <label>
        Adults
        <br />
        <input className={field} name="adults" inputMode="numeric" />
      </label>
      <label>
        Glazing area (m²)
        <br />
        <input className={field} name="glazingAreaM2" inputMode="decimal" />
      </label>
      <label>
        Openable area (m²)
        <br />
        <input className={field} name="openableAreaM2" inputMode="decimal" />
      </label>
      <label>
        Ventilation
        <br />
        <select className={field} name="ventilationType">
          {options.ventilationTypes.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </label>
      <div className="flex items-end gap-2 sm:col-span-2">
        <button
          type="submit"
          className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white"
          disabled={create.isPending}
        >
          Save room
        </button>
        {error && (
          <span role="alert" className="text-danger">
            {error}
          </span>
        )}
      </div>
    </form>
  );
}
