'use client';

import { useRouter } from 'next/navigation';
import { useId, useState } from 'react';
import { Badge, Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { plural } from '@/components/ui/upload-words';
import type { AddressField, AddressMapping, AddressValues, RowError } from '@/lib/households/address-mapping';

type Counts = { rows: number; added: number; changed: number; removed: number; restored: number; unchanged: number };
interface Change {
  key: string;
  row: number;
  fields: string[];
}
interface Preview {
  format: 'csv' | 'geojson' | 'shapefile';
  fileName: string;
  columns: string[];
  mapping: AddressMapping;
  guessed: AddressField[];
  crs: string | null;
  partial: boolean;
  problems: { path: string; message: string }[];
  warnings: string[];
  rowCount: number;
  rows: AddressValues[];
  errors: RowError[];
  counts: Counts;
  changes: { added: string[]; changed: Change[]; restored: Change[]; removed: string[] };
}

const FIELDS: [AddressField, string][] = [
  ['key', 'Key (the register\'s own id)'], ['street', 'Street'], ['number', 'House number'], ['postcode', 'Postcode'], ['locality', 'Locality'],
  ['units', 'Households (units)'], ['buildingType', 'Building type'], ['lon', 'Longitude'], ['lat', 'Latitude'], ['x', 'Easting'], ['y', 'Northing'],
  ['route', 'Serving route (design)'], ['side', 'Side (route / across)'], ['connected', 'Connected (yes / no)'],
];
const POSITION: AddressField[] = ['lon', 'lat', 'x', 'y'];
const FIELD_WORDS: Record<string, string> = { buildingType: 'building type', designRouteRef: 'route', designSide: 'side' };
const SHOWN_ERRORS = 200;

/**
 * The address register's import: pick the file, see the columns as guessed (change any), preview what the
 * import would add, change, remove and restore and every row that cannot be used (row number and reason),
 * then import it. Nothing is stored until "Import", and then the whole file or nothing.
 */
export function AddressImport({ projectId }: { projectId: string }) {
  const router = useRouter();
  const ids = { file: useId(), crs: useId(), partial: useId() };
  const [file, setFile] = useState<File | null>(null);
  const [crs, setCrs] = useState('');
  const [partial, setPartial] = useState(false);
  const [mapping, setMapping] = useState<AddressMapping | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  // the preview no longer matches what would be sent (mapping, CRS or partial changed)
  const [stale, setStale] = useState(false);
  const [error, setError] = useState<{ message: string; rows?: RowError[] } | null>(null);
  const [busy, setBusy] = useState(false);
  const [done, setDone] = useState<string | null>(null);

  const geometry = preview ? preview.format !== 'csv' : false;

  async function send(dryRun: boolean) {
    if (!file) return;
    setBusy(true);
    setError(null);
    setDone(null);
    const body = new FormData();
    body.append('file', file);
    if (crs.trim()) body.append('crs', crs.trim());
    if (mapping) body.append('mapping', JSON.stringify(Object.fromEntries(Object.entries(mapping).filter(([, v]) => v))));
    if (partial) body.append('partial', 'true');
    if (dryRun) body.append('dryRun', 'true');
    try {
      const res = await fetch(`/api/projects/${projectId}/addresses`, { method: 'POST', body });
      const json = await res.json().catch(() => null);
      if (!res.ok) {
        const e = json?.error;
        const d = e?.details;
        if (d && !Array.isArray(d) && d.mapping) setMapping(d.mapping);
        setError({ message: e?.message ?? `Request failed (${res.status}).`, rows: Array.isArray(d) ? d.filter((x: { row?: number }) => x.row) : undefined });
        return;
      }
      if (dryRun) {
        const p: Preview = json.preview;
        setPreview(p);
        setMapping(p.mapping);
        setStale(false);
      } else {
        const c: Counts = json.counts;
        setDone(`Imported ${json.import.fileName}: ${plural(c.rows, 'address', 'addresses')}; ${c.added} added, ${c.changed} changed, ${c.removed} removed, ${c.restored} restored, ${c.unchanged} unchanged.`);
        setPreview(null);
        setMapping(null);
        router.refresh();
      }
    } catch {
      setError({ message: 'The server could not be reached. Check your connection and send the file again.' });
    } finally {
      setBusy(false);
    }
  }

  const blocked = !preview || stale || preview.problems.length > 0 || preview.errors.length > 0 || preview.counts.rows === 0;
  const fieldsShown = FIELDS.filter(([f]) => !(geometry && POSITION.includes(f)));

  return (
    <div className="flex max-w-3xl flex-col gap-4">
      <Field label="Address register file" htmlFor={ids.file} hint="A CSV (longitude and latitude, or easting and northing columns), GeoJSON points, or a zipped shapefile of points with its .prj.">
        <Input
          id={ids.file}
          type="file"
          accept=".csv,.txt,.geojson,.json,.zip,text/csv,application/geo+json,application/zip"
          onChange={(e) => {
            // the mapping stays: a corrected file usually has the same columns (the preview says when not)
            setFile(e.target.files?.[0] ?? null);
            setPreview(null);
            setError(null);
            setDone(null);
          }}
        />
      </Field>
      <Field label="EPSG code of eastings and northings (only for a CSV with x/y columns)" htmlFor={ids.crs}>
        <Input id={ids.crs} value={crs} onChange={(e) => { setCrs(e.target.value); setStale(true); }} placeholder="e.g. 27700" inputMode="numeric" />
      </Field>
      <label htmlFor={ids.partial} className="flex min-h-12 items-center gap-2 text-sm">
        <input id={ids.partial} type="checkbox" className="h-5 w-5" checked={partial} onChange={(e) => { setPartial(e.target.checked); setStale(true); }} />
        Partial import: only add and update addresses, remove none (without it the file is the whole register, and addresses it lacks are marked removed)
      </label>
      {mapping && preview && preview.columns.length > 0 && (
        <fieldset className="grid grid-cols-1 gap-3 sm:grid-cols-2">
          <legend className="mb-2 text-sm font-medium">Columns{geometry ? ' (the position comes from the points)' : ''}</legend>
          {fieldsShown.map(([f, label]) => (
            <label key={f} className="flex flex-col text-sm">
              <span className="flex items-center gap-2">
                {label}
                {preview.guessed.includes(f) && mapping[f] === preview.mapping[f] && <Badge tone="info">guessed</Badge>}
              </span>
              <Select
                aria-label={`Column for ${label}`}
                value={mapping[f] ?? ''}
                onChange={(e) => {
                  setMapping({ ...mapping, [f]: e.target.value || undefined });
                  setStale(true);
                }}
                className="min-h-12"
              >
                <option value="">— not in the file —</option>
                {preview.columns.map((c) => <option key={c} value={c}>{c}</option>)}
              </Select>
            </label>
          ))}
        </fieldset>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="button" variant="secondary" className="min-h-12" disabled={!file || busy} onClick={() => void send(true)}>{busy ? 'Reading…' : 'Preview'}</Button>
        <Button type="button" className="min-h-12" disabled={blocked || busy} onClick={() => void send(false)}>
          {preview && !blocked ? `Import ${plural(preview.counts.rows, 'address', 'addresses')}` : 'Import'}
        </Button>
      </div>
      <div aria-live="polite" className="flex flex-col gap-3">
        {done && <Notice tone="ok">{done}</Notice>}
        {error && (
          <Notice tone="bad">
            {error.message}
            {error.rows && error.rows.length > 0 && <ul className="mt-1 list-disc pl-5">{error.rows.slice(0, SHOWN_ERRORS).map((r) => <li key={r.row}>Row {r.row}: {r.message}</li>)}</ul>}
          </Notice>
        )}
        {preview && stale && <Notice tone="info">The columns or settings changed: preview again before importing.</Notice>}
        {preview && <PreviewReport preview={preview} />}
      </div>
    </div>
  );
}

function PreviewReport({ preview }: { preview: Preview }) {
  const c = preview.counts;
  const fields = (ch: Change) => ch.fields.map((f) => FIELD_WORDS[f] ?? f).join(', ');
  return (
    <>
      <p className="text-sm">
        {preview.fileName} ({preview.format === 'shapefile' ? 'shapefile' : preview.format.toUpperCase()}{preview.crs ? `, ${preview.crs}` : ''}): {plural(preview.rowCount, 'row')}.
      </p>
      {preview.problems.map((p) => <Notice key={p.path + p.message} tone="bad">{p.message}</Notice>)}
      {preview.warnings.map((w) => <Notice key={w} tone="warn">{w}</Notice>)}
      {preview.problems.length === 0 && (
        <dl className="grid grid-cols-2 gap-2 text-sm sm:grid-cols-5" aria-label="What the import would do">
          {(['added', 'changed', 'removed', 'restored', 'unchanged'] as const).map((k) => (
            <div key={k} className="rounded-md border border-ink/10 p-2">
              <dt className="text-xs text-ink-soft">{k}</dt>
              <dd className="text-lg font-semibold tabular-nums" data-testid={`count-${k}`}>{c[k]}</dd>
            </div>
          ))}
        </dl>
      )}
      {preview.errors.length > 0 && (
        <Notice tone="bad">
          {plural(preview.errors.length, 'row')} cannot be imported; correct the file (or the columns) and preview again. Nothing is stored while any row fails.
          <ul className="mt-1 list-disc pl-5" aria-label="Rows that cannot be imported">
            {preview.errors.slice(0, SHOWN_ERRORS).map((r) => <li key={r.row}>Row {r.row}{r.key ? ` (${r.key})` : ''}: {r.message}</li>)}
            {preview.errors.length > SHOWN_ERRORS && <li>… and {preview.errors.length - SHOWN_ERRORS} more</li>}
          </ul>
        </Notice>
      )}
      {preview.changes.changed.length > 0 && (
        <details className="text-sm">
          <summary>Changed addresses</summary>
          <ul className="mt-1 list-disc pl-5">{preview.changes.changed.map((ch) => <li key={ch.key}>{ch.key} (row {ch.row}): {fields(ch)}</li>)}</ul>
        </details>
      )}
      {preview.changes.removed.length > 0 && (
        <details className="text-sm">
          <summary>Addresses that would be removed</summary>
          <p className="mt-1">{preview.changes.removed.join(', ')}</p>
        </details>
      )}
      {preview.changes.restored.length > 0 && (
        <details className="text-sm">
          <summary>Addresses that would come back</summary>
          <p className="mt-1">{preview.changes.restored.map((r) => r.key).join(', ')}</p>
        </details>
      )}
      {preview.rows.length > 0 && (
        <div className="overflow-x-auto">
          <table className="text-sm">
            <caption className="text-left text-xs text-ink-soft">The first addresses as they would be stored</caption>
            <thead>
              <tr className="text-left"><th className="pr-3">Row</th><th className="pr-3">Key</th><th className="pr-3">Address</th><th className="pr-3">Units</th><th>Position</th></tr>
            </thead>
            <tbody>
              {preview.rows.map((r) => (
                <tr key={r.row}>
                  <td className="pr-3 tabular-nums">{r.row}</td>
                  <td className="pr-3">{r.key}</td>
                  <td className="pr-3">{[r.street, r.number].filter(Boolean).join(' ')}{r.locality ? `, ${r.locality}` : ''}</td>
                  <td className="pr-3 tabular-nums">{r.units ?? 1}</td>
                  <td className="tabular-nums">{r.lat.toFixed(6)}, {r.lon.toFixed(6)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </>
  );
}
