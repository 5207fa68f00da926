import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import {
  DEFAULT_ASSUMPTIONS,
  EngineInputError,
  listAssumptions,
  validateAssumptionSet,
  withAssumptionValue,
  type AssumptionEntry,
  type AssumptionSet,
  type UnitModel,
} from '../../engine';
import { assumptionLimit, rangeInWords } from '../../engine/assumption-limits';
import { label } from '../../engine/vocabulary';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { can } from '../auth/permissions';
import { badRequest, forbidden } from '../http/errors';
import type { AssumptionEditBody, UnitCatalogueBody } from './assessments.schemas';
import {
  getCurrentAssumptionSet,
  insertAssumptionVersion,
  listAssumptionVersions,
  versionLabel,
  type AssumptionVersionSummary,
  type StoredAssumptionSet,
} from './assumptions.repository';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** The catalogue is edited through its own endpoint, where each field has its kind. */
const CATALOGUE_PATH = 'retrofit.unitCatalogue';

/** The assumptions page's data: the current version's values with provenance, and the version history. */
export interface AssumptionsView {
  id: string;
  version: number;
  label: string;
  createdAt: string;
  createdByEmail: string | null;
  entries: AssumptionEntry[];
  catalogue: UnitModel[];
  versions: AssumptionVersionSummary[];
}

/** The declaration order of the shipped defaults (JSONB does not keep key order, so stored sets are re-sorted). */
const CANONICAL_ORDER = new Map(listAssumptions(DEFAULT_ASSUMPTIONS).map((e, i) => [e.path, i]));
export const inCanonicalOrder = (entries: AssumptionEntry[]) =>
  [...entries].sort((a, b) => (CANONICAL_ORDER.get(a.path) ?? Infinity) - (CANONICAL_ORDER.get(b.path) ?? Infinity));

export async function getAssumptionsView(db: Kysely<Database>, trust: ActiveTrust): Promise<AssumptionsView> {
  const current = await getCurrentAssumptionSet(db, trust.id);
  return {
    id: current.id,
    version: current.version,
    label: current.label,
    createdAt: current.createdAt,
    createdByEmail: current.createdByEmail,
    entries: inCanonicalOrder(listAssumptions(current.set)),
    catalogue: current.set.retrofit.unitCatalogue.value,
    versions: await listAssumptionVersions(db, trust.id),
  };
}

/** True when `next` has the same JSON shape as `previous` (numbers stay numbers, tables keep their keys). */
function sameShape(previous: unknown, next: unknown): boolean {
  if (Array.isArray(previous)) {
    if (!Array.isArray(next) || next.length === 0) return false;
    const model = previous[0];
    return model === undefined || next.every((item) => sameShape(model, item));
  }
  if (typeof previous === 'object' && previous !== null) {
    if (typeof next !== 'object' || next === null || Array.isArray(next)) return false;
    const keys = Object.keys(previous);
    const nextKeys = Object.keys(next);
    return (
      keys.length === nextKeys.length &&
      keys.every(
        (k) => k in next && sameShape((previous as Record<string, unknown>)[k], (next as Record<string, unknown>)[k]),
      )
    );
  }
  if (typeof previous === 'number') return typeof next === 'number' && Number.isFinite(next);
  return typeof previous === typeof next;
}

/** 403 unless the role may change some kind of assumption (checked before the body is read). */
export function requireAssumptionEditor(trust: ActiveTrust): void {
  if (!can(trust.role, 'assumptions', 'edit_technical') && !can(trust.role, 'assumptions', 'edit_financial'))
    throw forbidden('change assumptions');
}

function requireKind(trust: ActiveTrust, kind: 'technical' | 'financial', what: string): void {
  const action = kind === 'technical' ? 'edit_technical' : 'edit_financial';
  if (!can(trust.role, 'assumptions', action)) throw forbidden(`change ${kind} assumptions (${what})`);
}

/** A refused value in words: the assumption's label, where in its table, and the range in the unit people type. */
function assumptionProblemWords(set: AssumptionSet, path: string, reason: string): string {
  const entry = listAssumptions(set).find((e) => path === e.path || path.startsWith(`${e.path}.`));
  if (!entry) return `An assumption ${reason}.`;
  const where = path
    .slice(entry.path.length + 1)
    .split('.')
    .filter(Boolean)
    .map((p) => label(p))
    .join(', ');
  const limit = assumptionLimit(path);
  const rule = limit ? `must be ${rangeInWords(limit, entry.unit)}` : reason;
  return `${entry.label}${where ? ` (${where})` : ''} ${rule}.`;
}

/** Validates the edited set with the engine's own ranges; a bad value is a 400 naming the assumption. */
function validated(set: AssumptionSet): AssumptionSet {
  try {
    validateAssumptionSet(set);
    return set;
  } catch (error) {
    if (error instanceof EngineInputError) {
      const path = error.field.replace(/^assumptions\./, '');
      throw badRequest(assumptionProblemWords(set, path, error.message.slice(error.field.length + 2)), { path });
    }
    throw error;
  }
}

async function saveVersion(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  current: StoredAssumptionSet,
  next: AssumptionSet,
  summary: string,
  audit: { action: string; before: unknown; after: unknown },
): Promise<StoredAssumptionSet> {
  return db.transaction().execute(async (trx) => {
    const saved = await insertAssumptionVersion(trx, {
      trustId: trust.id,
      version: current.version + 1,
      set: { ...next, version: versionLabel(current.version + 1), dated: new Date().toISOString().slice(0, 10) },
      changeSummary: summary,
      userId: actor.actorUserId,
      email: actor.actorEmail,
    });
    await recordAudit(trx, {
      ...actor,
      trustId: trust.id,
      action: audit.action,
      entityType: 'assumption_set',
      entityId: saved.id,
      summary: `Assumptions version ${saved.version}: ${summary}`,
      before: audit.before,
      after: audit.after,
    });
    return saved;
  });
}

/**
 * Saves changed values as a new version. Each path must name one assumption; technical values need
 * assumptions:edit_technical and financial ones assumptions:edit_financial (403 naming the value otherwise).
 */
export async function editAssumptions(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  body: AssumptionEditBody,
): Promise<StoredAssumptionSet> {
  const current = await getCurrentAssumptionSet(db, trust.id);
  const entries = new Map(listAssumptions(current.set).map((e) => [e.path, e]));
  let next = current.set;
  const before: Record<string, unknown> = {};
  const after: Record<string, unknown> = {};
  for (const change of body.changes) {
    if (change.path === CATALOGUE_PATH)
      throw badRequest('Edit the unit catalogue with PUT /api/unit-models.', { path: change.path });
    const entry = entries.get(change.path);
    if (!entry) throw badRequest(`There is no assumption "${change.path}".`, { path: change.path });
    requireKind(trust, entry.kind, entry.label);
    if (!sameShape(entry.value, change.value)) {
      throw badRequest(
        `"${entry.label}" must keep its form (${Array.isArray(entry.value) ? 'a list' : typeof entry.value === 'object' ? 'a table with the same rows' : `a ${typeof entry.value}`}).`,
        { path: change.path },
      );
    }
    before[change.path] = entry.value;
    after[change.path] = change.value;
    next = withAssumptionValue(next, change.path, change.value, current.label);
  }
  const summary = body.summary || `Changed ${body.changes.map((c) => entries.get(c.path)!.label).join(', ')}`;
  return saveVersion(db, trust, actor, current, validated(next), summary, {
    action: 'assumptions.changed',
    before,
    after,
  });
}

const TECHNICAL_FIELDS = [
  'name',
  'nominalFlowLps',
  'heatRecoveryEfficiency',
  'specificFanPowerWPerLps',
  'lifeYears',
  'soundDbA',
] as const;
const FINANCIAL_FIELDS = ['installedCostGbp', 'annualMaintenanceGbp'] as const;

/**
 * Replaces the unit catalogue as a new assumption version. Adding or removing a model, or changing its
 * flow, efficiency, fan power, life or sound, is technical; changing an existing model's installed cost or
 * maintenance is financial. A trust admin may do both.
 */
export async function saveUnitCatalogue(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  body: UnitCatalogueBody,
): Promise<StoredAssumptionSet> {
  const current = await getCurrentAssumptionSet(db, trust.id);
  const previous = current.set.retrofit.unitCatalogue.value;
  const byId = new Map(previous.map((m) => [m.id, m]));
  const nextIds = new Set(body.models.map((m) => m.id));
  let technical = previous.some((m) => !nextIds.has(m.id));
  let financial = false;
  for (const model of body.models) {
    const old = byId.get(model.id);
    if (!old) technical = true;
    else {
      if (TECHNICAL_FIELDS.some((f) => old[f] !== model[f])) technical = true;
      if (FINANCIAL_FIELDS.some((f) => old[f] !== model[f])) financial = true;
    }
  }
  if (!technical && !financial) throw badRequest('The catalogue is unchanged: nothing to save.');
  if (technical) requireKind(trust, 'technical', 'unit models, flows, efficiency, fan power, life or sound');
  if (financial) requireKind(trust, 'financial', 'installed cost or maintenance of a unit model');
  const next = withAssumptionValue(current.set, CATALOGUE_PATH, body.models, current.label);
  const summary = body.summary || 'Unit catalogue edited';
  return saveVersion(db, trust, actor, current, validated(next), summary, {
    action: 'unit_catalogue.changed',
    before: previous,
    after: body.models,
  });
}
