import { useState } from 'react';
import { useEstateEdit, useSchool } from '../../lib/client/register';
import { EditableCell } from './EditableCell';
import type { Option, RegisterPermissions, SchoolOption } from './types';

/** Edits a school's attributes and its blocks (name, year built, construction, air permeability). */
export function SchoolsEditor({
  schools,
  options,
  can,
}: {
  schools: SchoolOption[];
  options: { phases: Option[]; climateRegions: Option[]; constructionTypes: Option[]; heatingFuels: Option[] };
  can: RegisterPermissions;
}) {
  const [schoolId, setSchoolId] = useState(schools[0]?.id);
  const school = useSchool(schoolId);
  const edit = useEstateEdit(schoolId);
  const [message, setMessage] = useState<string | null>(null);
  const [newBlock, setNewBlock] = useState('');
  const [timetable, setTimetable] = useState<string | null>(null);
  const s = school.data?.school;
  const run = (change: Parameters<typeof edit.mutate>[0]) =>
    edit.mutate(change, {
      onError: (e) => setMessage(`Not saved: ${e.message}`),
      onSuccess: () => setMessage('Saved.'),
    });
  const num = (v: string | number | null) => (v === null ? null : Number(v));
  if (schools.length === 0) return <p className="text-ink-muted">No schools yet: import a register to create them.</p>;
  return (
    <section aria-label="Schools and blocks" className="space-y-4">
      <label className="text-sm">
        School
        <br />
        <select
          className="rounded-control border border-line bg-surface px-2 py-1"
          value={schoolId}
          onChange={(e) => setSchoolId(e.target.value)}
        >
          {schools.map((o) => (
            <option key={o.id} value={o.id}>
              {o.name}
            </option>
          ))}
        </select>
      </label>
      <p role="status" aria-live="polite" className={message ? 'rounded-control bg-brand-soft p-2 text-sm' : 'sr-only'}>
        {message ?? ''}
      </p>
      {s && (
        <>
          <dl className="grid max-w-2xl grid-cols-[12rem_1fr] gap-y-1 rounded-card border border-line bg-surface p-4 text-sm">
            <dt className="text-ink-muted">Name</dt>
            <dd>
              <EditableCell
                value={s.name}
                kind="text"
                editable={can.canUpdate}
                label="School name"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { name: v } })}
              />
            </dd>
            <dt className="text-ink-muted">Reference number</dt>
            <dd>
              <EditableCell
                value={s.referenceNumber}
                kind="text"
                nullable
                editable={can.canUpdate}
                label="Reference number"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { referenceNumber: v === '' ? null : v } })}
              />
            </dd>
            <dt className="text-ink-muted">Phase</dt>
            <dd>
              <EditableCell
                value={s.phase}
                kind="select"
                options={options.phases}
                editable={can.canUpdate}
                label="Phase"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { phase: v } })}
              />
            </dd>
            <dt className="text-ink-muted">Climate region</dt>
            <dd>
              <EditableCell
                value={s.climateRegion}
                kind="select"
                options={options.climateRegions}
                editable={can.canUpdate}
                label="Climate region"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { climateRegion: v } })}
              />
            </dd>
            <dt className="text-ink-muted">Heating fuel</dt>
            <dd>
              <EditableCell
                value={s.heatingFuel}
                kind="select"
                options={options.heatingFuels}
                editable={can.canUpdate}
                label="School heating fuel"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { heatingFuel: v } })}
              />
            </dd>
            <dt className="text-ink-muted">Fuel price (£/kWh)</dt>
            <dd>
              <EditableCell
                value={s.fuelPriceGbpPerKwh}
                kind="number"
                nullable
                display={s.fuelPriceGbpPerKwh === null ? "The trust's price (blank)" : undefined}
                editable={can.canUpdate}
                label="School fuel price"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { fuelPriceGbpPerKwh: num(v) } })}
              />
            </dd>
            <dt className="text-ink-muted">{s.heatingFuel === 'heat_pump' ? 'Seasonal COP' : 'Heating efficiency'}</dt>
            <dd>
              <EditableCell
                value={s.heatingEfficiency}
                kind="number"
                nullable
                display={s.heatingEfficiency === null ? "The trust's default (blank)" : undefined}
                editable={can.canUpdate}
                label="School heating efficiency"
                onCommit={(v) => run({ kind: 'school', id: s.id, changes: { heatingEfficiency: num(v) } })}
              />
            </dd>
            <dt className="text-ink-muted">School day</dt>
            <dd>
              {can.canUpdate ? (
                <form
                  onSubmit={(e) => {
                    e.preventDefault();
                    run({ kind: 'school', id: s.id, changes: { timetable: timetable ?? s.timetableText } });
                  }}
                >
                  <textarea
                    aria-label="School day, one period a line"
                    className="w-full rounded-control border border-line bg-surface px-2 py-1 font-mono text-xs"
                    rows={5}
                    placeholder={
                      "Blank: the trust's timetable. One period a line, e.g.\n09:00-10:00 lesson\n10:00-10:15 break"
                    }
                    value={timetable ?? s.timetableText}
                    onChange={(e) => setTimetable(e.target.value)}
                  />
                  <button type="submit" className="mt-1 rounded-control border border-line px-2 py-1">
                    Save the school day
                  </button>
                </form>
              ) : (
                <pre className="whitespace-pre-wrap">{s.timetableText || "The trust's timetable"}</pre>
              )}
            </dd>
          </dl>
          <p className="max-w-2xl text-xs text-ink-muted">
            Heating is priced block first, then school, then the trust's assumption set. A block with its own fuel never
            takes the school's price or efficiency. Heat pumps record a seasonal COP (1–6); direct electric heating is
            1.
          </p>
          <div className="overflow-x-auto rounded-card border border-line bg-surface">
            <table className="w-full text-left text-sm" data-testid="blocks-table">
              <caption className="sr-only">Blocks of {s.name}</caption>
              <thead className="border-b border-line text-ink-muted">
                <tr>
                  <th scope="col" className="px-2 py-2">
                    Block
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Year built
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Construction
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Air permeability (m³/(h·m²) @ 50 Pa)
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Heating fuel
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Fuel price (£/kWh)
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Efficiency / COP
                  </th>
                  <th scope="col" className="px-2 py-2">
                    Rooms
                  </th>
                  {can.canDelete && (
                    <th scope="col">
                      <span className="sr-only">Actions</span>
                    </th>
                  )}
                </tr>
              </thead>
              <tbody>
                {s.blocks.map((b) => (
                  <tr key={b.id} className="border-b border-line last:border-0">
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.name}
                        kind="text"
                        editable={can.canUpdate}
                        label={`Name of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { name: v } })}
                      />
                    </td>
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.yearBuilt}
                        kind="number"
                        nullable
                        editable={can.canUpdate}
                        label={`Year built of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { yearBuilt: num(v) } })}
                      />
                    </td>
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.constructionType}
                        kind="select"
                        nullable
                        options={options.constructionTypes}
                        editable={can.canUpdate}
                        label={`Construction of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { constructionType: v } })}
                      />
                    </td>
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.airPermeabilityM3hM2}
                        kind="number"
                        nullable
                        editable={can.canUpdate}
                        label={`Air permeability of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { airPermeabilityM3hM2: num(v) } })}
                      />
                    </td>
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.heatingFuel}
                        kind="select"
                        nullable
                        options={options.heatingFuels}
                        display={b.heatingFuel === null ? "The school's" : undefined}
                        editable={can.canUpdate}
                        label={`Heating fuel of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { heatingFuel: v } })}
                      />
                    </td>
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.fuelPriceGbpPerKwh}
                        kind="number"
                        nullable
                        display={b.fuelPriceGbpPerKwh === null ? 'Inherited' : undefined}
                        editable={can.canUpdate}
                        label={`Fuel price of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { fuelPriceGbpPerKwh: num(v) } })}
                      />
                    </td>
                    <td className="px-2 py-1">
                      <EditableCell
                        value={b.heatingEfficiency}
                        kind="number"
                        nullable
                        display={b.heatingEfficiency === null ? 'Inherited' : undefined}
                        editable={can.canUpdate}
                        label={`Heating efficiency of block ${b.name}`}
                        onCommit={(v) => run({ kind: 'block', id: b.id, changes: { heatingEfficiency: num(v) } })}
                      />
                    </td>
                    <td className="px-2 py-1 tabular-nums">{b.roomCount}</td>
                    {can.canDelete && (
                      <td className="px-2 py-1">
                        <button
                          type="button"
                          className="text-danger hover:underline"
                          onClick={() => {
                            if (
                              window.confirm(
                                `Delete block ${b.name}? Its ${b.roomCount} rooms stay in the school without a block.`,
                              )
                            )
                              run({ kind: 'deleteBlock', id: b.id });
                          }}
                        >
                          Delete
                        </button>
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {can.canCreate && (
            <form
              className="flex items-end gap-2 text-sm"
              onSubmit={(e) => {
                e.preventDefault();
                if (newBlock.trim()) run({ kind: 'newBlock', name: newBlock.trim() });
                setNewBlock('');
              }}
            >
              <label>
                New block name
                <br />
                <input
                  className="rounded-control border border-line bg-surface px-2 py-1"
                  value={newBlock}
                  onChange={(e) => setNewBlock(e.target.value)}
                />
              </label>
              <button type="submit" className="rounded-control bg-brand px-3 py-1.5 font-semibold text-white">
                Add block
              </button>
            </form>
          )}
        </>
      )}
    </section>
  );
}
