import { stringify } from 'csv-stringify';
import { PassThrough, Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { AuditRow } from '@/db/tables';
import { streamAuditForProject } from '@/db/audit';
import { exportsStore } from '@/lib/storage/exports-store';
import type { JobHandler } from './kinds';

/** Writes a project's audit log, oldest first, as CSV (RFC 4180) into the exports store. */
export const exportAuditLog: JobHandler = async ({ db, jobId, projectId, progress }) => {
  const [{ count }] = await db('audit_log').where({ project_id: projectId }).count<{ count: number }[]>('* as count');
  const total = Number(count);
  await progress(0, `Writing ${total} audit entries`);
  let rows = 0;
  const toRecord = new Transform({
    objectMode: true,
    transform(r: AuditRow, _enc, done) {
      rows += 1;
      if (rows % 500 === 0) void progress(rows / Math.max(total, 1), `${rows} of ${total} entries`);
      done(null, [
        r.id,
        r.at.toISOString(),
        r.actor_label,
        r.object_type,
        r.object_id,
        r.action,
        r.before === null ? '' : JSON.stringify(r.before),
        r.after === null ? '' : JSON.stringify(r.after),
      ]);
    },
  });
  const out = new PassThrough();
  const key = `audit/${projectId}/${jobId}.csv`;
  const [{ size }] = await Promise.all([
    exportsStore().put(key, out),
    pipeline(
      streamAuditForProject(db, projectId),
      toRecord,
      stringify({ header: true, columns: ['id', 'at', 'actor', 'object_type', 'object_id', 'action', 'before', 'after'] }),
      out,
    ),
  ]);
  return {
    message: `Exported ${rows} audit entries`,
    result: { storageKey: key, rows, bytes: size, fileName: `audit-${projectId}.csv`, contentType: 'text/csv' },
  };
};
