import type { AuditEntry } from '@/db/audit';
import { DataTable } from '@/components/ui/data-table';
import { describeAudit, words } from './audit-words';

/** The audit log as a sortable table, newest first, each entry a sentence of what changed. */
export function AuditTable({ entries, timeZone }: { entries: AuditEntry[]; timeZone: string }) {
  const fmt = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'medium', timeZone });
  return (
    <DataTable
      label="Activity"
      empty="Nothing recorded yet."
      columns={[
        { key: 'change', label: 'What happened' },
        { key: 'at', label: 'When', priority: 1 },
        { key: 'who', label: 'Who', priority: 1 },
        { key: 'object', label: 'About' },
      ]}
      rows={entries.map((e) => ({
        id: String(e.id),
        cells: {
          at: { text: fmt.format(new Date(e.at)), sort: e.at },
          who: e.actorLabel.replace(/\s*<[^>]*>$/, ''),
          object: words(e.objectType),
          change: describeAudit(e),
        },
      }))}
    />
  );
}
