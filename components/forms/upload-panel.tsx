'use client';

import { useRouter } from 'next/navigation';
import { useCallback, useEffect, useRef, useState } from 'react';
import { ACCURACY_CLASS_LABELS } from '@/lib/records/accuracy-classes';
import { DATE_RANGE } from '@/lib/records/plausible-ranges';
import { Badge, Button, Field, Input, Select } from '@/components/ui/primitives';
import { callApi } from './api-client';
import { explainRefusal as explain, plural, RETRYABLE, storedMessage, warningWords } from '@/components/ui/upload-words';

type ItemState = 'mapping' | 'uploading' | 'parsing' | 'stored' | 'duplicate' | 'failed';

interface Item {
  key: string;
  files: File[];
  state: ItemState;
  sent: number;
  total: number;
  message: string;
  /** the server's own words, where they say where in the file */
  detail?: string;
  errorCode?: string;
  uploadId?: string;
  columns?: { headers: string[]; map: Record<string, string>; guessed: boolean };
  /** the first rows of a CSV, split for display in the mapping step */
  sample?: string[][];
}

/** The first rows of a CSV for the preview table (display only; the server does the real parsing). */
function sampleRows(text: string, rows = 6): string[][] {
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '').slice(0, rows);
  const head = lines[0] ?? '';
  const delim = [';', '\t', ','].map((d) => [d, head.split(d).length] as const).sort((a, b) => b[1] - a[1])[0][0];
  return lines.map((l) => l.split(delim).map((c) => c.trim().replace(/^"|"$/g, '')));
}

const COLUMN_ROLES: [string, string][] = [
  ['id', 'Point id'], ['x', 'Easting'], ['y', 'Northing'], ['lat', 'Latitude'], ['lon', 'Longitude'], ['z', 'Height'],
  ['code', 'Code'], ['line', 'Line id'], ['date', 'Date'], ['fix', 'Fix type'], ['rmsH', 'Horizontal RMS'], ['rmsV', 'Vertical RMS'],
  ['depth', 'Depth (cover, m)'],
];

const SHAPE_PARTS = /\.(shp|shx|dbf|prj|cpg|sbn|sbx|qix|xml)$/i;

/** Loose shapefile parts with one base name travel together; every other file is its own upload. */
function group(files: File[]): File[][] {
  const sets = new Map<string, File[]>();
  const singles: File[][] = [];
  for (const f of files) {
    if (SHAPE_PARTS.test(f.name)) {
      const base = f.name.replace(SHAPE_PARTS, '').toLowerCase();
      sets.set(base, [...(sets.get(base) ?? []), f]);
    } else singles.push([f]);
  }
  return [...singles, ...sets.values()];
}

const looksLikeCsv = (f: File) => /\.(csv|txt|tsv)$/i.test(f.name) || f.type === 'text/csv';

function send(url: string, form: FormData, onProgress: (sent: number, total: number) => void, onSent: () => void) {
  return new Promise<{ status: number; body: any }>((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => onProgress(e.loaded, e.total);
    xhr.upload.onload = onSent;
    xhr.onload = () => resolve({ status: xhr.status, body: xhr.response });
    xhr.onerror = () => resolve({ status: 0, body: { error: { code: 'network', message: 'The connection failed before the server answered. Try again.' } } });
    xhr.send(form);
  });
}

export function UploadPanel({ projectId, defaultAccuracy, defaultCrs }: { projectId: string; defaultAccuracy: string; defaultCrs: string }) {
  const router = useRouter();
  const [items, setItems] = useState<Item[]>([]);
  const [hover, setHover] = useState(false);
  const projectCode = defaultCrs.replace(/^EPSG:/i, '');
  // prefilled with the project's grid; sent for survey CSVs (their eastings and northings need it) and,
  // once someone changes it, for every file: a GeoJSON or shapefile would otherwise be read in that grid
  const [settings, setSettings] = useState({ accuracy: defaultAccuracy, surveyDate: '', crew: '', content: 'trench', crs: projectCode, crsChanged: false });
  const [crsOptions, setCrsOptions] = useState<{ code: string; name: string }[]>([]);
  const input = useRef<HTMLInputElement>(null);
  const settingsRef = useRef(settings);
  settingsRef.current = settings;

  const patch = (key: string, p: Partial<Item>) => setItems((all) => all.map((i) => (i.key === key ? { ...i, ...p } : i)));

  useEffect(() => {
    const q = settings.crs.trim();
    if (q.length < 2) return;
    const t = setTimeout(async () => {
      const r = await callApi<{ results: { code: string; name: string }[] }>(`/api/crs?q=${encodeURIComponent(q.replace(/^epsg:/i, ''))}`, 'GET');
      if (r.ok) setCrsOptions(r.data.results);
    }, 250);
    return () => clearTimeout(t);
  }, [settings.crs]);

  const formFor = (files: File[], extra: Record<string, string> = {}) => {
    const s = settingsRef.current;
    const form = new FormData();
    const crs = s.crsChanged || (files.length === 1 && looksLikeCsv(files[0])) ? s.crs.trim() : '';
    for (const [k, v] of Object.entries({ accuracy: s.accuracy, surveyDate: s.surveyDate, crew: s.crew, content: s.content, crs, ...extra })) if (v) form.append(k, v);
    for (const f of files) form.append('file', f, f.name);
    return form;
  };

  const upload = useCallback(async (item: Item, columns?: Record<string, string>) => {
    const total = item.files.reduce((n, f) => n + f.size, 0);
    patch(item.key, { state: 'uploading', sent: 0, total, message: 'Sending…' });
    const extra: Record<string, string> = columns ? { columns: JSON.stringify(Object.fromEntries(Object.entries(columns).filter(([, v]) => v))) } : {};
    const res = await send(
      `/api/projects/${projectId}/uploads`,
      formFor(item.files, extra),
      (sent, t) => patch(item.key, { sent, total: t }),
      () => patch(item.key, { state: 'parsing', message: 'Sent; reading the file…' }),
    );
    const err = res.body?.error;
    if (res.status === 201 || res.status === 200) {
      const u = res.body.upload;
      patch(item.key, {
        state: res.status === 201 ? 'stored' : 'duplicate',
        uploadId: u.id,
        message: res.status === 201 ? `${storedMessage(u)}${u.warnings.length ? ` ${u.warnings.map(warningWords).join(' ')}` : ''}` : 'This file is already in the project: nothing new was stored.',
      });
    } else {
      const why = explain(err?.code, err?.message ?? `The server answered ${res.status}.`, defaultCrs);
      patch(item.key, { state: 'failed', message: why.text, detail: why.detail, errorCode: err?.code, uploadId: err?.details?.uploadId });
    }
    router.refresh();
  }, [projectId, router, defaultCrs]);

  const preview = useCallback(async (item: Item) => {
    // the first 256 kB, cut at a line end, is enough to read the header and guess the columns
    const head = await item.files[0].slice(0, 256 * 1024).text();
    const cut = head.length === item.files[0].size ? head : head.slice(0, head.lastIndexOf('\n') + 1);
    const form = formFor([new File([cut], item.files[0].name, { type: 'text/csv' })]);
    const res = await fetch(`/api/projects/${projectId}/uploads/preview`, { method: 'POST', body: form });
    const body = await res.json().catch(() => null);
    if (res.ok && body?.preview?.columns) {
      patch(item.key, { state: 'mapping', columns: body.preview.columns, sample: sampleRows(cut), message: `${plural(body.preview.pointCount, 'point')} in the first part of the file.${body.preview.columns.guessed ? ' The columns below were recognised from the header: check them, then upload.' : ''}` });
    } else if (body?.error?.code === 'crs_required') {
      const sample = sampleRows(cut);
      patch(item.key, { state: 'mapping', sample, columns: body.error.details?.columns ?? { headers: sample[0] ?? [], map: {}, guessed: true }, message: 'The file has eastings and northings but does not say in which grid. Enter its EPSG number under "Coordinate system" above, check the columns, then upload.' });
    } else {
      // not a survey CSV after all, or unreadable: send it as it is and let the server say what is wrong
      void upload(item);
    }
  }, [projectId, upload]);

  const add = (files: File[]) => {
    const fresh = group(files).map((fs, n) => ({ key: `${Date.now()}-${n}-${fs[0].name}`, files: fs, state: 'uploading' as ItemState, sent: 0, total: 0, message: 'Waiting…' }));
    setItems((all) => [...fresh, ...all]);
    for (const it of fresh) {
      if (it.files.length === 1 && looksLikeCsv(it.files[0])) void preview(it);
      else void upload(it);
    }
  };

  const retry = async (item: Item, crs: string) => {
    patch(item.key, { state: 'parsing', message: 'Reading the stored file again…', detail: undefined });
    const res = await fetch(`/api/projects/${projectId}/uploads/${item.uploadId}/retry`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ crs }) });
    const body = await res.json().catch(() => null);
    if (res.ok) patch(item.key, { state: 'stored', errorCode: undefined, message: storedMessage(body.upload) });
    else {
      const why = explain(body?.error?.code, body?.error?.message ?? `The server answered ${res.status}.`, defaultCrs);
      patch(item.key, { state: 'failed', errorCode: body?.error?.code, message: why.text, detail: why.detail });
    }
    router.refresh();
  };

  return (
    <div className="space-y-5">
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-5">
        <Field label="Accuracy" htmlFor="up-accuracy">
          <Select id="up-accuracy" value={settings.accuracy} onChange={(e) => setSettings({ ...settings, accuracy: e.target.value })}>
            {Object.entries(ACCURACY_CLASS_LABELS).map(([v, l]) => <option key={v} value={v}>{l}</option>)}
          </Select>
        </Field>
        <Field label="What it shows" htmlFor="up-content">
          <Select id="up-content" value={settings.content} onChange={(e) => setSettings({ ...settings, content: e.target.value })}>
            <option value="trench">Trench line</option>
            <option value="road_crossings">Road crossings</option>
            <option value="test_pits">Test pits</option>
            <option value="depth_shots">Depth shots</option>
            <option value="mixed">Mixed, by point code</option>
          </Select>
        </Field>
        <Field label="Survey date" htmlFor="up-date">
          <Input id="up-date" type="date" min={DATE_RANGE.min} max={new Date(Date.now() + DATE_RANGE.maxDaysAhead * 86_400_000).toISOString().slice(0, 10)} value={settings.surveyDate} onChange={(e) => setSettings({ ...settings, surveyDate: e.target.value })} />
        </Field>
        <Field label="Crew" htmlFor="up-crew">
          <Input id="up-crew" value={settings.crew} onChange={(e) => setSettings({ ...settings, crew: e.target.value })} placeholder="e.g. Crew 2" />
        </Field>
        <Field label="Coordinate system" htmlFor="up-crs" hint={`EPSG number of the grid, for files that do not say (survey CSVs with eastings and northings). Project's usual grid: ${projectCode}.`}>
          <Input id="up-crs" list="up-crs-options" value={settings.crs} onChange={(e) => setSettings({ ...settings, crs: e.target.value, crsChanged: true })} placeholder="e.g. 25832, or a name to search" />
          <datalist id="up-crs-options">
            {crsOptions.map((o) => <option key={o.code} value={o.code.replace(/^EPSG:/i, '')}>{o.name}</option>)}
          </datalist>
        </Field>
      </div>

      <div
        onDragOver={(e) => { e.preventDefault(); setHover(true); }}
        onDragLeave={() => setHover(false)}
        onDrop={(e) => { e.preventDefault(); setHover(false); add([...e.dataTransfer.files]); }}
        data-testid="dropzone"
        className={`flex flex-col items-center justify-center gap-2 rounded-lg border-2 border-dashed px-4 py-10 text-center ${hover ? 'border-brand bg-brand-light/40' : 'border-ink/20 bg-paper'}`}
      >
        <p className="text-sm font-medium">Drop files here</p>
        <p className="text-xs text-ink-soft">GPX, KML/KMZ, zipped or loose shapefile parts, GeoJSON, survey CSV — several at once</p>
        <Button type="button" variant="secondary" onClick={() => input.current?.click()}>Choose files</Button>
        <input ref={input} type="file" multiple className="sr-only" aria-label="Choose files to upload" onChange={(e) => { add([...(e.target.files ?? [])]); e.target.value = ''; }} />
      </div>

      {items.length > 0 && (
        <ul className="divide-y divide-ink/10 rounded-md border border-ink/10" aria-label="Files being uploaded">
          {items.map((it) => (
            <li key={it.key} className="space-y-2 px-3 py-3 text-sm" data-testid="upload-item">
              <div className="flex flex-wrap items-center gap-2">
                <span className="font-medium">{it.files.map((f) => f.name).join(' + ')}</span>
                <Badge tone={it.state === 'stored' ? 'ok' : it.state === 'failed' ? 'bad' : it.state === 'duplicate' ? 'info' : 'muted'}>
                  {{ mapping: 'check columns', uploading: 'sending', parsing: 'reading', stored: 'stored', duplicate: 'already here', failed: 'refused' }[it.state]}
                </Badge>
                {it.uploadId && <a href={`/projects/${projectId}/uploads/${it.uploadId}`}>details</a>}
              </div>
              {(it.state === 'uploading' || it.state === 'parsing') && (
                <progress className="h-2 w-full accent-brand" max={it.total || 1} value={it.state === 'parsing' ? it.total || 1 : it.sent} aria-label={`Progress of ${it.files[0].name}`} />
              )}
              <p className={it.state === 'failed' ? 'font-medium text-status-bad' : 'text-ink-soft'} role={it.state === 'failed' ? 'status' : undefined}>{it.message}</p>
              {it.state === 'failed' && it.detail && (
                <details className="text-xs text-ink-soft">
                  <summary className="cursor-pointer">Where in the file</summary>
                  <p className="mt-1 break-words">{it.detail}</p>
                </details>
              )}
              {it.state === 'mapping' && it.columns && <ColumnMapper item={it} onUpload={(map) => upload(it, map)} />}
              {it.state === 'failed' && it.errorCode && RETRYABLE.has(it.errorCode) && it.uploadId && (
                <RetryWithCrs itemKey={it.key} initial={settings.crs.trim() || projectCode} onRetry={(crs) => retry(it, crs)} />
              )}
              {it.state === 'failed' && (!it.errorCode || !RETRYABLE.has(it.errorCode)) && it.uploadId && (
                <p className="text-xs text-ink-soft">Correct the file and upload it again; the refused one stays listed below with its original.</p>
              )}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

function ColumnMapper({ item, onUpload }: { item: Item; onUpload: (map: Record<string, string>) => void }) {
  const [map, setMap] = useState<Record<string, string>>(item.columns!.map);
  const headers = item.columns!.headers;
  return (
    <div className="space-y-3 rounded-md bg-paper p-3">
      {item.sample && item.sample.length > 1 && (
        <div className="overflow-x-auto">
          <table className="min-w-full text-xs" aria-label={`Preview of ${item.files[0].name}`}>
            <thead><tr>{item.sample[0].map((h, i) => <th key={i} className="px-2 py-1 text-left font-semibold">{h}</th>)}</tr></thead>
            <tbody>{item.sample.slice(1).map((r, i) => <tr key={i}>{r.map((c, j) => <td key={j} className="px-2 py-1 tabular-nums">{c}</td>)}</tr>)}</tbody>
          </table>
        </div>
      )}
      <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6">
        {COLUMN_ROLES.map(([role, label]) => (
          <Field key={role} label={label} htmlFor={`map-${item.key}-${role}`}>
            <Select id={`map-${item.key}-${role}`} value={map[role] ?? ''} onChange={(e) => setMap({ ...map, [role]: e.target.value })}>
              <option value="">—</option>
              {headers.map((h) => <option key={h} value={h}>{h}</option>)}
            </Select>
          </Field>
        ))}
      </div>
      <Button type="button" onClick={() => onUpload(map)}>Upload with these columns</Button>
    </div>
  );
}

/** Reads the refused upload's stored file again in another grid: nothing is sent twice. */
function RetryWithCrs({ itemKey, initial, onRetry }: { itemKey: string; initial: string; onRetry: (crs: string) => void }) {
  const [crs, setCrs] = useState(initial);
  const id = `retry-crs-${itemKey}`;
  return (
    <div className="flex flex-wrap items-end gap-2">
      <Field label="Coordinate system of this file (EPSG number)" htmlFor={id}>
        <Input id={id} value={crs} onChange={(e) => setCrs(e.target.value)} placeholder="e.g. 25832" inputMode="numeric" />
      </Field>
      <Button type="button" disabled={!crs.trim()} onClick={() => onRetry(crs.trim())}>Read it again</Button>
    </div>
  );
}
