import { useImports } from '../../lib/client/register';
import { formatDateTime } from '../../lib/format';

const STATUS: Record<string, string> = {
  previewed: 'Previewed, not imported',
  committed: 'Imported',
  cancelled: 'Cancelled',
  failed: 'Failed',
};

/** Every register the trust has uploaded: who, when, file, counts and outcome. */
export function ImportHistory() {
  const imports = useImports();
  if (imports.isLoading) return <p className="text-ink-muted">Loading the import history…</p>;
  if (imports.error)
    return (
      <p role="alert" className="text-danger">
        {imports.error.message}
      </p>
    );
  const list = imports.data?.imports ?? [];
  if (list.length === 0) return <p className="text-ink-muted">No register has been imported yet.</p>;
  return (
    <div className="overflow-x-auto rounded-card border border-line bg-surface">
      <table className="w-full text-left text-sm" data-testid="import-history">
        <caption className="sr-only">Import history</caption>
        <thead className="border-b border-line text-ink-muted">
          <tr>
            <th scope="col" className="px-3 py-2">
              When
            </th>
            <th scope="col" className="px-3 py-2">
              Who
            </th>
            <th scope="col" className="px-3 py-2">
              File
            </th>
            <th scope="col" className="px-3 py-2">
              Outcome
            </th>
            <th scope="col" className="px-3 py-2 text-right">
              Created
            </th>
            <th scope="col" className="px-3 py-2 text-right">
              Changed
            </th>
            <th scope="col" className="px-3 py-2 text-right">
              Deleted
            </th>
            <th scope="col" className="px-3 py-2 text-right">
              Rows rejected
            </th>
          </tr>
        </thead>
        <tbody>
          {list.map((i) => (
            <tr key={i.id} className="border-b border-line last:border-0">
              <td className="px-3 py-2 whitespace-nowrap">{formatDateTime(i.createdAt)}</td>
              <td className="px-3 py-2">{i.createdByEmail ?? '—'}</td>
              <td className="px-3 py-2">{i.fileName}</td>
              <td className="px-3 py-2">{STATUS[i.status] ?? i.status}</td>
              <td className="px-3 py-2 text-right tabular-nums">
                {i.outcome?.roomsCreated ?? i.summary.roomsToCreate}
              </td>
              <td className="px-3 py-2 text-right tabular-nums">
                {i.outcome?.roomsChanged ?? i.summary.roomsToChange}
              </td>
              <td className="px-3 py-2 text-right tabular-nums">{i.outcome?.roomsDeleted ?? 0}</td>
              <td className="px-3 py-2 text-right tabular-nums">{i.summary.rowsRejected}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
