'use client';

import { useRouter } from 'next/navigation';
import { useId, useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { formatQuantity, type UnitSystem } from '@/lib/records/units';

type Map = Partial<Record<'lon' | 'lat' | 'x' | 'y' | 'route' | 'chainage' | 'cover' | 'depth' | 'time' | 'note', string>>;
interface Preview {
  fileName: string;
  columns: { map: Map; guessed: boolean; headers: string[] };
  placement: 'position' | 'chainage';
  crs: string | null;
  rowCount: number;
  readyCount: number;
  problems: { row: number; message: string }[];
  warnings: string[];
  sample: { row: number; routeRef: string; chainageM: number; coverM: number | null; trenchDepthM: number | null; compliance: string }[];
  stored?: number;
}

const ROLES: [keyof Map, string][] = [
  ['route', 'Route reference'], ['chainage', 'Chainage (m)'], ['lon', 'Longitude'], ['lat', 'Latitude'], ['x', 'Easting'], ['y', 'Northing'],
  ['cover', 'Cover (m)'], ['depth', 'Trench depth (m)'], ['time', 'Time'], ['note', 'Note'],
];

/**
 * A CSV of depth readings: the same steps as a survey upload. Pick the file, see the columns as guessed
 * (change any), the rows that cannot be stored with their row numbers, and the first readings; then store
 * them all at once. Nothing is stored until "Store the readings", and then all or none.
 */
export function DepthImport({ projectId, system }: { projectId: string; system: UnitSystem }) {
  const router = useRouter();
  const ids = { file: useId(), crs: useId() };
  const [file, setFile] = useState<File | null>(null);
  const [crs, setCrs] = useState('');
  const [map, setMap] = useState<Map | null>(null);
  const [headers, setHeaders] = useState<string[]>([]);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [error, setError] = useState<{ message: string; rows?: { row: number; message: string }[] } | null>(null);
  const [busy, setBusy] = useState(false);
  const [done, setDone] = useState<string | null>(null);

  async function send(confirm: boolean) {
    if (!file) return;
    setBusy(true);
    setError(null);
    setDone(null);
    const body = new FormData();
    body.append('file', file);
    if (crs.trim()) body.append('crs', crs.trim());
    if (map) body.append('columns', JSON.stringify(Object.fromEntries(Object.entries(map).filter(([, v]) => v))));
    if (confirm) body.append('confirm', '1');
    try {
      const res = await fetch(`/api/projects/${projectId}/depth-readings/import${confirm ? '' : '?preview=1'}`, { method: 'POST', body });
      const json = await res.json().catch(() => null);
      if (!res.ok) {
        const e = json?.error;
        const cols = e?.details?.columns;
        if (cols) {
          setHeaders(cols.headers);
          setMap(cols.map);
        }
        setError({ message: e?.message ?? `Request failed (${res.status}).`, rows: Array.isArray(e?.details) ? e.details.filter((d: { row?: number }) => d.row) : undefined });
        return;
      }
      const p: Preview = confirm ? json.import : json.preview;
      setPreview(p);
      setHeaders(p.columns.headers);
      setMap(p.columns.map);
      if (confirm) {
        setDone(`Stored ${p.stored} reading${p.stored === 1 ? '' : 's'} from ${p.fileName}.`);
        setPreview(null);
        router.refresh();
      }
    } catch {
      setError({ message: 'The server could not be reached. Check your connection and send the file again.' });
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="flex max-w-3xl flex-col gap-4">
      <Field label="CSV file" htmlFor={ids.file} hint="Columns: route and chainage, or longitude and latitude, or easting and northing; cover and/or trench depth in metres; time optional.">
        <Input id={ids.file} type="file" accept=".csv,.txt,text/csv" onChange={(e) => { setFile(e.target.files?.[0] ?? null); setPreview(null); setMap(null); setError(null); setDone(null); }} />
      </Field>
      <Field label="EPSG code of easting/northing (if the file has them)" htmlFor={ids.crs}>
        <Input id={ids.crs} value={crs} onChange={(e) => setCrs(e.target.value)} placeholder="e.g. 25832" inputMode="numeric" />
      </Field>
      {map && headers.length > 0 && (
        <fieldset className="grid grid-cols-1 gap-3 sm:grid-cols-2">
          <legend className="mb-2 text-sm font-medium">Columns{preview?.columns.guessed ? ' (guessed from the header: check them)' : ''}</legend>
          {ROLES.map(([k, label]) => (
            <label key={k} className="flex flex-col text-sm">
              {label}
              <Select value={map[k] ?? ''} onChange={(e) => setMap({ ...map, [k]: e.target.value || undefined })} className="min-h-12">
                <option value="">— not in the file —</option>
                {headers.map((h) => <option key={h} value={h}>{h}</option>)}
              </Select>
            </label>
          ))}
        </fieldset>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="button" variant="secondary" className="min-h-12" disabled={!file || busy} onClick={() => void send(false)}>{busy ? 'Reading…' : 'Check the file'}</Button>
        <Button type="button" className="min-h-12" disabled={!preview || preview.problems.length > 0 || preview.readyCount === 0 || busy} onClick={() => void send(true)}>
          {preview ? `Store the ${preview.readyCount} reading${preview.readyCount === 1 ? '' : 's'}` : 'Store the readings'}
        </Button>
      </div>
      <div aria-live="polite" className="flex flex-col gap-3">
        {done && <Notice tone="ok">{done}</Notice>}
        {error && (
          <Notice tone="bad">
            {error.message}
            {error.rows && error.rows.length > 0 && <ul className="mt-1 list-disc pl-5">{error.rows.slice(0, 50).map((r) => <li key={r.row}>{r.message}</li>)}</ul>}
          </Notice>
        )}
        {preview && (
          <>
            <p className="text-sm">
              {preview.fileName}: {preview.rowCount} row{preview.rowCount === 1 ? '' : 's'}, placed by {preview.placement === 'chainage' ? 'route and chainage' : `position${preview.crs ? ` (${preview.crs})` : ''}`}; {preview.readyCount} ready to store.
            </p>
            {preview.warnings.filter((w) => !w.startsWith('columns were guessed')).map((w) => <Notice key={w} tone="warn">{w}</Notice>)}
            {preview.problems.length > 0 && (
              <Notice tone="bad">
                {preview.problems.length} row{preview.problems.length === 1 ? '' : 's'} cannot be stored; correct the file (or the columns) and check it again. Nothing is stored while any row fails.
                <ul className="mt-1 list-disc pl-5">{preview.problems.slice(0, 50).map((p) => <li key={p.row}>{p.message}</li>)}</ul>
              </Notice>
            )}
            {preview.sample.length > 0 && (
              <table className="text-sm">
                <caption className="text-left text-xs text-ink-soft">The first readings as they would be stored</caption>
                <thead><tr className="text-left"><th className="pr-3">Row</th><th className="pr-3">Route</th><th className="pr-3">Chainage</th><th className="pr-3">Cover</th><th className="pr-3">Trench depth</th><th>Cover check</th></tr></thead>
                <tbody>
                  {preview.sample.map((s) => (
                    <tr key={s.row}>
                      <td className="pr-3 tabular-nums">{s.row}</td><td className="pr-3">{s.routeRef}</td>
                      <td className="pr-3 tabular-nums">{formatQuantity(s.chainageM, 'length', system)}</td>
                      <td className="pr-3 tabular-nums">{formatQuantity(s.coverM, 'depth', system)}</td>
                      <td className="pr-3 tabular-nums">{formatQuantity(s.trenchDepthM, 'depth', system)}</td>
                      <td>{s.compliance === 'fail' ? 'below minimum' : s.compliance === 'pass' ? 'ok' : '—'}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </>
        )}
      </div>
    </div>
  );
}
