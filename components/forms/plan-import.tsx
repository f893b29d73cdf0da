'use client';

import { useRouter } from 'next/navigation';
import { useRef, useState } from 'react';
import { Button, Field, Input, Notice } from '@/components/ui/primitives';
import { explainRefusal, plural } from '@/components/ui/upload-words';

/** Sends a design file with an optional attribute mapping; shows progress and the change list. */
export function PlanImport({ projectId, defaultCrs = 'EPSG:4326' }: { projectId: string; defaultCrs?: string }) {
  const router = useRouter();
  const file = useRef<HTMLInputElement>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [result, setResult] = useState<{ tone: 'ok' | 'bad'; text: string } | null>(null);

  function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const files = file.current?.files ? [...file.current.files] : [];
    if (files.length === 0) return setResult({ tone: 'bad', text: 'Choose the design file first.' });
    const mapping = Object.fromEntries(['ref', 'street', 'ducts', 'kind'].map((k) => [k, String(f.get(`map-${k}`) ?? '').trim()]).filter(([, v]) => v));
    const form = new FormData();
    for (const x of files) form.append('file', x, x.name);
    if (Object.keys(mapping).length) form.append('mapping', JSON.stringify(mapping));
    const crs = String(f.get('plan-crs') ?? '').trim();
    if (crs) form.append('crs', crs);
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/projects/${projectId}/planned`);
    xhr.responseType = 'json';
    xhr.upload.onprogress = (ev) => setProgress(ev.total ? ev.loaded / ev.total : 0);
    xhr.onload = () => {
      setProgress(null);
      const body = xhr.response as { version?: { version: number; routeCount: number; changes: Record<string, string[]>; diagnostics: unknown[] }; error?: { code?: string; message: string } } | null;
      if (body?.version) {
        const v = body.version;
        setResult({
          tone: 'ok',
          text: xhr.status === 200 ? `This file is already version ${v.version}; nothing changed.` : `Version ${v.version}: ${plural(v.routeCount, 'route')} — ${v.changes.added.length} added, ${v.changes.removed.length} removed, ${v.changes.reshaped.length} reshaped, ${v.changes.retagged.length} retagged; ${v.diagnostics.length === 1 ? '1 thing' : `${v.diagnostics.length} things`} to check.`,
        });
        router.refresh();
      } else if (body?.error) {
        const why = explainRefusal(body.error.code, body.error.message, defaultCrs);
        setResult({ tone: 'bad', text: `${why.text.replace('read it again', 'import it again')}${why.detail ? ` (${why.detail})` : ''}` });
      } else setResult({ tone: 'bad', text: `The server answered ${xhr.status}.` });
    };
    xhr.onerror = () => {
      setProgress(null);
      setResult({ tone: 'bad', text: 'The connection failed. Try again.' });
    };
    setResult(null);
    setProgress(0);
    xhr.send(form);
  }

  return (
    <form onSubmit={submit} className="space-y-4" noValidate>
      <div className="grid gap-4 sm:grid-cols-3">
        <Field label="Design file" htmlFor="plan-file" hint="GeoJSON, KML/KMZ or zipped shapefile">
          <input ref={file} id="plan-file" type="file" multiple className="block w-full text-sm" />
        </Field>
        <Field label="Coordinate system" htmlFor="plan-crs" hint={`EPSG number of the grid, only when the file does not say; this project usually works in ${defaultCrs.replace(/^EPSG:/, '')}.`}>
          <Input id="plan-crs" name="plan-crs" placeholder="e.g. 25832" />
        </Field>
      </div>
      <fieldset>
        <legend className="text-sm font-medium">Attribute mapping (optional; guessed from the names when empty)</legend>
        <div className="mt-1 grid grid-cols-2 gap-3 sm:grid-cols-4">
          {[['ref', 'Route reference'], ['street', 'Street'], ['ducts', 'Planned ducts'], ['kind', 'Street route or crossing']].map(([k, l]) => (
            <Field key={k} label={l} htmlFor={`map-${k}`}>
              <Input id={`map-${k}`} name={`map-${k}`} placeholder="attribute name" />
            </Field>
          ))}
        </div>
      </fieldset>
      <Button type="submit" disabled={progress !== null}>Import</Button>
      {progress !== null && <progress className="h-2 w-full accent-brand" max={1} value={progress} aria-label="Progress of the design file" />}
      {result && <div role="status"><Notice tone={result.tone}>{result.text}</Notice></div>}
    </form>
  );
}
