import type { AuditEntry } from '@/db/audit';
import { DataTable } from '@/components/ui/data-table';

function summarise(before: unknown, after: unknown): string {
  if (!before || !after || typeof before !== 'object' || typeof after !== 'object') {
    return after ? JSON.stringify(after).slice(0, 160) : '';
  }
  const b = before as Record<string, unknown>;
  const a = after as Record<string, unknown>;
  const changed = Object.keys(a).filter((k) => JSON.stringify(a[k]) !== JSON.stringify(b[k]));
  return changed.map((k) => `${k}: ${JSON.stringify(b[k])} → ${JSON.stringify(a[k])}`).join('; ').slice(0, 240);
}

/** The audit log as a sortable table, newest first, with what changed spelled out. */
export function AuditTable({ entries, timeZone }: { entries: AuditEntry[]; timeZone: string }) {
  const fmt = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'medium', timeZone });
  return (
    <DataTable
      label="Activity"
      empty="Nothing recorded yet."
      columns={[
        { key: 'at', label: 'When' },
        { key: 'who', label: 'Who' },
        { key: 'object', label: 'Object' },
        { key: 'action', label: 'What' },
        { key: 'change', label: 'Change' },
      ]}
      rows={entries.map((e) => ({
        id: String(e.id),
        cells: {
          at: { text: fmt.format(new Date(e.at)), sort: e.at },
          who: e.actorLabel,
          object: `${e.objectType} ${e.objectId.slice(0, 8)}`,
          action: e.action,
          change: summarise(e.before, e.after),
        },
      }))}
    />
  );
}
