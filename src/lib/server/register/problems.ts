/** How the preview lists problems: the same warning on many rows is said once, with the rows it applies to. */
import type { ImportProblem } from './rows';

/**
 * Groups warnings that say the same thing about the same column ("Ventilation type blank: …" on 19 rows) into one
 * ("Ventilation type blank in 19 rows: …", with every row listed in `rows`). Errors stay one per row: each rejects its
 * row, and the rejected-rows workbook says what to fix row by row. Order follows each group's first row.
 */
export function groupRepeatedWarnings(problems: readonly ImportProblem[]): ImportProblem[] {
  const groups = new Map<string, ImportProblem[]>();
  const out: (ImportProblem | ImportProblem[])[] = [];
  for (const p of problems) {
    if (p.severity !== 'warning') {
      out.push(p);
      continue;
    }
    const key = `${p.column}\u0000${p.message}`;
    const group = groups.get(key);
    if (group) group.push(p);
    else {
      const fresh = [p];
      groups.set(key, fresh);
      out.push(fresh);
    }
  }
  return out.map((entry) => {
    if (!Array.isArray(entry)) return entry;
    const [first] = entry as [ImportProblem];
    if (entry.length === 1) return first;
    return { ...first, value: '', message: inRows(first.message, entry.length), rows: entry.map((p) => p.row) };
  });
}

/** "Ventilation type blank: stored as unknown." on 19 rows → "Ventilation type blank in 19 rows: stored as unknown." */
function inRows(message: string, count: number): string {
  const cut = message.indexOf(': ');
  return cut > 0
    ? `${message.slice(0, cut)} in ${count} rows: ${message.slice(cut + 2)}`
    : `${message.replace(/\.$/, '')} (${count} rows).`;
}
