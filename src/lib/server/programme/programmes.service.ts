/**
 * Capital programmes: create, re-plan, edit by hand, refresh from the latest results, delete — each write
 * audited in the same transaction — and read them as their page, list and comparison need them.
 */
import { type Kysely, type Transaction, sql } from 'kysely';
import type { Database } from '../../../../db/database';
import { EngineInputError } from '../../engine/errors';
import { formatInt, formatOneDecimal } from '../../engine/format';
import { programmeYearLabel, windowLabel } from '../../engine/programme/calendar';
import { ProgrammeInfeasibleError } from '../../engine/programme/errors';
import { evaluatePlan } from '../../engine/programme/evaluate';
import { type BuiltProblem, buildProblem } from '../../engine/programme/model';
import { planProgramme } from '../../engine/programme/plan';
import { buildReport, type UnplannableRoom } from '../../engine/programme/report';
import type {
  Assignment,
  ProgrammeCandidate,
  ProgrammeSettings,
  SolveInfo,
  WindowId,
} from '../../engine/programme/types';
import { type AuditEntry, recordAudit } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { can } from '../auth/permissions';
import { badRequest } from '../http/errors';
import { type CandidateSnapshot, type CandidateSource, readCandidates } from './candidates.repository';
import { getHighsSolver } from './highs-solver';
import { doesNotFit, noCandidates, programmeBeyondSchools, programmeNotFound } from './programme.errors';
import type { CreateProgrammeInput, ProgrammeEdit, UpdateProgrammeInput } from './programme.schemas';
import type { EditImpact, ProgrammeComparison, ProgrammeSummary, ProgrammeView } from './programme.types';

type Db = Kysely<Database> | Transaction<Database>;
type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** Where a room goes, as stored. */
interface Placement {
  roomId: string;
  year: number;
  windowId: WindowId;
}

/** A programme row as the service uses it. */
interface Stored {
  id: string;
  trustId: string;
  name: string;
  schoolIds: string[] | null;
  settings: ProgrammeSettings;
  snapshot: CandidateSnapshot;
  placements: Placement[];
  solve: SolveInfo;
  freeObjective: number | null;
  createdAt: Date;
  createdByEmail: string | null;
  updatedAt: Date;
  updatedByEmail: string | null;
}

const parse = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;

async function loadRow(db: Db, trustId: string, id: string, forUpdate = false): Promise<Stored | null> {
  let query = db.selectFrom('programmes').selectAll().where('trust_id', '=', trustId).where('id', '=', id);
  if (forUpdate) query = query.forUpdate();
  const row = await query.executeTakeFirst();
  if (!row) return null;
  return {
    id: row.id,
    trustId: row.trust_id,
    name: row.name,
    schoolIds: row.school_ids,
    settings: parse<ProgrammeSettings>(row.settings),
    snapshot: {
      candidates: parse<ProgrammeCandidate[]>(row.candidates),
      unplannable: parse<UnplannableRoom[]>(row.unplannable),
      source: parse<CandidateSource>(row.source),
    },
    placements: parse<Placement[]>(row.placements),
    solve: parse<SolveInfo>(row.solve),
    freeObjective: row.free_objective,
    createdAt: row.created_at,
    createdByEmail: row.created_by_email,
    updatedAt: row.updated_at,
    updatedByEmail: row.updated_by_email,
  };
}

/** The schools of a programme a member sees: null for all of them. */
function visibleSchools(trust: ActiveTrust, p: Pick<Stored, 'schoolIds'>): string[] | null {
  if (!trust.schoolIds) return p.schoolIds;
  if (!p.schoolIds) return trust.schoolIds;
  return p.schoolIds.filter((id) => trust.schoolIds!.includes(id));
}

/** A programme the member may read (404 when it is another trust's, or has none of their schools). */
async function readable(db: Db, trust: ActiveTrust, id: string, forUpdate = false): Promise<Stored> {
  const p = await loadRow(db, trust.id, id, forUpdate);
  if (!p) throw programmeNotFound();
  const visible = visibleSchools(trust, p);
  if (visible && trust.schoolIds && visible.length === 0) throw programmeNotFound();
  return p;
}

function mayEdit(trust: ActiveTrust, p: Pick<Stored, 'schoolIds'>): boolean {
  if (!can(trust.role, 'programme', 'edit')) return false;
  if (!trust.schoolIds) return true;
  return p.schoolIds?.every((id) => trust.schoolIds!.includes(id)) ?? false;
}

function placementsOf(built: BuiltProblem, assignment: Assignment): Placement[] {
  const out: Placement[] = [];
  assignment.forEach((k, i) => {
    if (k < 0) return;
    const slot = built.problem.slots[k]!;
    out.push({ roomId: built.candidates[i]!.roomId, year: slot.year, windowId: slot.windowId });
  });
  return out;
}

function assignmentOf(built: BuiltProblem, placements: readonly Placement[]): Assignment {
  const slotOf = new Map(built.problem.slots.map((s) => [`${s.year}:${s.windowId}`, s.index]));
  const where = new Map(placements.map((p) => [p.roomId, slotOf.get(`${p.year}:${p.windowId}`) ?? -1]));
  return Int32Array.from(built.candidates, (c) => where.get(c.roomId) ?? -1);
}

/** Room codes of rooms, for messages. */
function codes(snapshot: CandidateSnapshot, roomIds: readonly string[]): string {
  const byId = new Map(snapshot.candidates.map((c) => [c.roomId, c]));
  const names = roomIds.slice(0, 5).map((id) => {
    const c = byId.get(id);
    return c ? `${c.roomCode} (${c.schoolName})` : 'a room';
  });
  return names.join(', ') + (roomIds.length > 5 ? ` and ${roomIds.length - 5} more` : '');
}

/** Builds and solves; engine input errors become 400, rooms that cannot fit become 409. */
async function plan(settings: ProgrammeSettings, snapshot: CandidateSnapshot) {
  if (snapshot.candidates.length === 0) throw noCandidates();
  const known = new Set(snapshot.candidates.map((c) => c.roomId));
  const unknown = [...settings.forcedIn, ...settings.pins.map((p) => p.roomId)].filter((id) => !known.has(id));
  if (unknown.length > 0)
    throw badRequest(
      'Only rooms with recommended units can be forced in or pinned; one of the rooms given has none in this programme’s results.',
      { roomIds: unknown },
    );
  let built: BuiltProblem;
  try {
    built = buildProblem(settings, snapshot.candidates);
  } catch (error) {
    if (error instanceof EngineInputError) throw badRequest(error.message, { field: error.field });
    throw error;
  }
  const solver = await getHighsSolver();
  try {
    const result = planProgramme(built.problem, { solver });
    return { built, ...result };
  } catch (error) {
    if (error instanceof ProgrammeInfeasibleError)
      throw doesNotFit(
        `${codes(snapshot, error.roomIds)} cannot be placed: ${error.message}. Raise that year's capital or the window's days, ` +
          'or unpin or release other rooms.',
      );
    throw error;
  }
}

/** The plan's benefit (pupil-hours a year, or score) without the earliness weighting. */
const planValue = (built: BuiltProblem, assignment: Assignment) => evaluatePlan(built.problem, assignment).value;

/** Plans with the settings, and (when rooms are pinned by hand) once more without the pins for comparison. */
async function planWithFree(settings: ProgrammeSettings, snapshot: CandidateSnapshot) {
  const planned = await plan(settings, snapshot);
  let freeValue: number | null = null;
  if (settings.pins.length > 0) {
    const free = await plan({ ...settings, pins: [] }, snapshot);
    freeValue = planValue(free.built, free.assignment);
  }
  return { ...planned, freeValue };
}

function rowValues(
  settings: ProgrammeSettings,
  planned: Awaited<ReturnType<typeof planWithFree>>,
  actorEmail: string | null,
) {
  return {
    settings: JSON.stringify(settings),
    placements: JSON.stringify(placementsOf(planned.built, planned.assignment)),
    solve: JSON.stringify(planned.info),
    free_objective: planned.freeValue,
    updated_by_email: actorEmail,
  };
}

/** Creates a programme from the latest results (or from `basedOn`'s snapshot) and plans it. */
export async function createProgramme(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  input: CreateProgrammeInput,
): Promise<{ id: string }> {
  const base = input.basedOn ? await readable(db, trust, input.basedOn) : null;
  if (base && !mayEdit(trust, base)) throw programmeBeyondSchools();
  const schoolIds = base ? base.schoolIds : trust.schoolIds;
  const snapshot = base ? base.snapshot : await readCandidates(db, trust.id, schoolIds);
  const settings = input.settings as ProgrammeSettings;
  const planned = await planWithFree(settings, snapshot);
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto('programmes')
      .values({
        trust_id: trust.id,
        name: input.name,
        school_ids: schoolIds,
        candidates: JSON.stringify(snapshot.candidates),
        unplannable: JSON.stringify(snapshot.unplannable),
        source: JSON.stringify(snapshot.source),
        created_by_email: actor.actorEmail,
        ...rowValues(settings, planned, actor.actorEmail),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'programme.create',
      entityType: 'programme',
      entityId: row.id,
      summary: `Programme “${input.name}” created${base ? ` as a scenario of “${base.name}”` : ''}: ${planned.info.words}`,
      after: { name: input.name, settings },
    });
    return { id: row.id };
  });
}

/** Renames and/or re-plans a programme with new settings (same candidate snapshot). */
export async function updateProgramme(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  input: UpdateProgrammeInput,
): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const p = await readable(trx, trust, id, true);
    if (!mayEdit(trust, p)) throw programmeBeyondSchools();
    const settings = (input.settings as ProgrammeSettings | undefined) ?? p.settings;
    const planned = input.settings ? await planWithFree(settings, p.snapshot) : null;
    await trx
      .updateTable('programmes')
      .set({
        ...(input.name ? { name: input.name } : {}),
        ...(planned ? rowValues(settings, planned, actor.actorEmail) : { updated_by_email: actor.actorEmail }),
      })
      .where('id', '=', id)
      .execute();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'programme.update',
      entityType: 'programme',
      entityId: id,
      summary: `Programme “${input.name ?? p.name}” ${planned ? `re-planned with new settings: ${planned.info.words}` : 'renamed'}`,
      before: { name: p.name, settings: p.settings },
      after: { name: input.name ?? p.name, settings },
    });
  });
}

/** The settings after one change by hand. */
function applyEdit(settings: ProgrammeSettings, edit: ProgrammeEdit): ProgrammeSettings {
  const without = (list: string[]) => list.filter((r) => r !== edit.roomId);
  const pins = settings.pins.filter((p) => p.roomId !== edit.roomId);
  switch (edit.action) {
    case 'pin':
      return {
        ...settings,
        keptOut: without(settings.keptOut),
        pins: [...pins, { roomId: edit.roomId, year: edit.year, windowId: edit.windowId }],
      };
    case 'unpin':
      return { ...settings, pins };
    case 'force_in':
      return {
        ...settings,
        keptOut: without(settings.keptOut),
        forcedIn: [...without(settings.forcedIn), edit.roomId],
      };
    case 'keep_out':
      return {
        ...settings,
        pins,
        forcedIn: without(settings.forcedIn),
        keptOut: [...without(settings.keptOut), edit.roomId],
      };
    case 'release':
      return { ...settings, pins, forcedIn: without(settings.forcedIn), keptOut: without(settings.keptOut) };
  }
}

function describeEdit(p: Stored, edit: ProgrammeEdit): string {
  const c = p.snapshot.candidates.find((x) => x.roomId === edit.roomId);
  const room = c ? `${c.roomCode} (${c.schoolName})` : 'a room';
  const { yearConvention, firstYear } = p.settings;
  switch (edit.action) {
    case 'pin':
      return `Pinned ${room} to ${
        edit.windowId
          ? windowLabel(yearConvention, firstYear, edit.year, edit.windowId)
          : programmeYearLabel(yearConvention, firstYear, edit.year)
      }`;
    case 'unpin':
      return `Unpinned ${room}`;
    case 'force_in':
      return `Forced ${room} into the programme`;
    case 'keep_out':
      return `Kept ${room} out of the programme`;
    case 'release':
      return `Released ${room} (no longer forced in, kept out or pinned)`;
  }
}

/** One change by hand: re-plans around it, checks every budget and window, and says what it costs in benefit. */
export async function editProgramme(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  edit: ProgrammeEdit,
): Promise<EditImpact> {
  return db.transaction().execute(async (trx) => {
    const p = await readable(trx, trust, id, true);
    if (!mayEdit(trust, p)) throw programmeBeyondSchools();
    if (!p.snapshot.candidates.some((c) => c.roomId === edit.roomId))
      throw badRequest('That room has no recommended units in this programme’s results, so it cannot be planned.');
    if (edit.action === 'pin' && edit.year > p.settings.budgetsGbp.length)
      throw badRequest(`The programme has ${p.settings.budgetsGbp.length} years; pin the room to one of them.`);
    const before = buildProblem(p.settings, p.snapshot.candidates);
    const valueBefore = planValue(before, assignmentOf(before, p.placements));
    const settings = applyEdit(p.settings, edit);
    const planned = await planWithFree(settings, p.snapshot);
    const valueAfter = planValue(planned.built, planned.assignment);
    await trx
      .updateTable('programmes')
      .set(rowValues(settings, planned, actor.actorEmail))
      .where('id', '=', id)
      .execute();
    const what = describeEdit(p, edit);
    const words = impactWords(what, valueBefore, valueAfter, settings.objective);
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'programme.edit',
      entityType: 'programme',
      entityId: id,
      summary: `${words} (programme “${p.name}”)`,
      before: { edit: null, pins: p.settings.pins, forcedIn: p.settings.forcedIn, keptOut: p.settings.keptOut },
      after: { edit, pins: settings.pins, forcedIn: settings.forcedIn, keptOut: settings.keptOut },
    });
    return { valueBefore, valueAfter, words };
  });
}

function impactWords(what: string, before: number, after: number, objective: ProgrammeSettings['objective']): string {
  const unit = objective === 'rank_weights' ? 'ranking score points' : 'pupil-hours of poor air removed a year';
  const diff = after - before;
  const pct = before > 0 ? (100 * Math.abs(diff)) / before : 0;
  if (Math.abs(diff) < 1e-6 * Math.max(1, before))
    return `${what}. The budgets and windows still hold, and the plan's benefit is unchanged.`;
  const amount = objective === 'rank_weights' ? formatOneDecimal(Math.abs(diff)) : formatInt(Math.abs(diff));
  return `${what}. The budgets and windows still hold; the plan now ${diff < 0 ? 'loses' : 'gains'} ${amount} ${unit} (${diff < 0 ? '−' : '+'}${formatOneDecimal(pct)} %).`;
}

/** Reads the latest assessment results into the programme and re-plans it. */
export async function refreshProgramme(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
): Promise<void> {
  const current = await readable(db, trust, id);
  if (!mayEdit(trust, current)) throw programmeBeyondSchools();
  const snapshot = await readCandidates(db, trust.id, current.schoolIds);
  await db.transaction().execute(async (trx) => {
    const p = await readable(trx, trust, id, true);
    const known = new Set(snapshot.candidates.map((c) => c.roomId));
    // Pins and forced rooms that no longer have units are dropped, and said so in the audit trail.
    const settings: ProgrammeSettings = {
      ...p.settings,
      forcedIn: p.settings.forcedIn.filter((r) => known.has(r)),
      pins: p.settings.pins.filter((pin) => known.has(pin.roomId)),
    };
    const planned = await planWithFree(settings, snapshot);
    await trx
      .updateTable('programmes')
      .set({
        candidates: JSON.stringify(snapshot.candidates),
        unplannable: JSON.stringify(snapshot.unplannable),
        source: JSON.stringify(snapshot.source),
        ...rowValues(settings, planned, actor.actorEmail),
      })
      .where('id', '=', id)
      .execute();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'programme.refresh',
      entityType: 'programme',
      entityId: id,
      summary: `Programme “${p.name}” re-planned from the latest assessment results (${snapshot.source.assumptionsVersions.join(', ') || 'no version'}): ${planned.info.words}`,
      before: { assumptionsVersions: p.snapshot.source.assumptionsVersions, candidates: p.snapshot.candidates.length },
      after: { assumptionsVersions: snapshot.source.assumptionsVersions, candidates: snapshot.candidates.length },
    });
  });
}

export async function deleteProgramme(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const p = await readable(trx, trust, id, true);
    if (!mayEdit(trust, p)) throw programmeBeyondSchools();
    await trx.deleteFrom('programmes').where('id', '=', id).execute();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'programme.delete',
      entityType: 'programme',
      entityId: id,
      summary: `Programme “${p.name}” deleted`,
      before: { name: p.name, settings: p.settings },
    });
  });
}

/** A stored programme with its problem rebuilt and its report for the member. */
function materialise(trust: ActiveTrust, p: Stored) {
  const built = buildProblem(p.settings, p.snapshot.candidates);
  const assignment = assignmentOf(built, p.placements);
  const report = buildReport({
    settings: p.settings,
    built,
    assignment,
    solve: p.solve,
    unplannable: p.snapshot.unplannable,
    visibleSchoolIds: visibleSchools(trust, p),
  });
  const yearLabels = p.settings.budgetsGbp.map((_, y) =>
    programmeYearLabel(p.settings.yearConvention, p.settings.firstYear, y + 1),
  );
  return { built, assignment, report, yearLabels };
}

function summaryOf(trust: ActiveTrust, p: Stored): ProgrammeSummary {
  const { report, yearLabels } = materialise(trust, p);
  return {
    id: p.id,
    name: p.name,
    createdAt: p.createdAt.toISOString(),
    updatedAt: p.updatedAt.toISOString(),
    updatedByEmail: p.updatedByEmail,
    yearLabels,
    budgetTotalGbp: report.budgetTotalGbp,
    rooms: report.totals.rooms,
    units: report.totals.units,
    capitalGbp: report.totals.capitalGbp,
    pupils: report.totals.pupils,
    pupilHoursRemovedPerYear: report.totals.pupilHoursRemovedPerYear,
    annualSavingKgCo2e: report.totals.annualSavingKgCo2e,
    annualSavingGbp: report.totals.annualSavingGbp,
    lifetimeTonnesCo2e: report.totals.lifetimeTonnesCo2e,
    gapPct: p.solve.gapPct,
    method: p.solve.method,
    assumptionsVersions: p.snapshot.source.assumptionsVersions,
    energyPriceChangePct: p.settings.energyPriceChangePct,
    objective: p.settings.objective,
    partial: report.partial,
  };
}

/** The trust's programmes the member can see, newest change first. */
export async function listProgrammes(db: Kysely<Database>, trust: ActiveTrust): Promise<ProgrammeSummary[]> {
  const rows = await db
    .selectFrom('programmes')
    .select('id')
    .where('trust_id', '=', trust.id)
    .$if(trust.schoolIds !== null, (q) =>
      q.where((eb) =>
        eb.or([eb('school_ids', 'is', null), sql<boolean>`school_ids && ${trust.schoolIds ?? []}::uuid[]`]),
      ),
    )
    .orderBy('updated_at', 'desc')
    .orderBy('id')
    .execute();
  const out: ProgrammeSummary[] = [];
  for (const { id } of rows) {
    const p = await loadRow(db, trust.id, id);
    if (p) out.push(summaryOf(trust, p));
  }
  return out;
}

/** One programme as its page shows it. */
export async function getProgramme(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<ProgrammeView> {
  const p = await readable(db, trust, id);
  const { report, yearLabels, built, assignment } = materialise(trust, p);
  const rooms: Record<string, string> = {};
  const blocks: Record<string, string> = {};
  for (const c of p.snapshot.candidates) {
    rooms[c.roomId] = `${c.roomCode} ${c.roomName} (${c.schoolName})`.replace(/\s+\(/, ' (');
    if (c.blockId) blocks[c.blockId] = `${c.blockName ?? 'Block'} (${c.schoolName})`;
  }
  return {
    id: p.id,
    name: p.name,
    settings: p.settings,
    source: p.snapshot.source,
    report,
    yearLabels,
    planValue: planValue(built, assignment),
    freeValue: p.freeObjective,
    canEdit: mayEdit(trust, p),
    scopeSchoolIds: p.schoolIds,
    createdAt: p.createdAt.toISOString(),
    createdByEmail: p.createdByEmail,
    updatedAt: p.updatedAt.toISOString(),
    updatedByEmail: p.updatedByEmail,
    names: { rooms, blocks },
  };
}

/** Two or three programmes side by side: their headline figures and cumulative benefit against spend. */
export async function compareProgrammes(
  db: Kysely<Database>,
  trust: ActiveTrust,
  ids: readonly string[],
): Promise<ProgrammeComparison> {
  const out: ProgrammeComparison = { programmes: [], series: [] };
  for (const id of ids) {
    const p = await readable(db, trust, id);
    out.programmes.push(summaryOf(trust, p));
    out.series.push({ id: p.id, name: p.name, points: materialise(trust, p).report.cumulative });
  }
  return out;
}

/** The stored programme with its built problem and report, for the exports. */
export async function programmeForExport(db: Kysely<Database>, trust: ActiveTrust, id: string) {
  const p = await readable(db, trust, id);
  const view = await getProgramme(db, trust, id);
  return { stored: p, view, ...materialise(trust, p) };
}
