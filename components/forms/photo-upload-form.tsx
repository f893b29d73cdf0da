'use client';

import { useRouter } from 'next/navigation';
import { useId, useRef, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { PlacePicker } from '@/components/map/place-picker';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { PHOTO_MAX_BYTES } from '@/lib/records/photo-schema';
import { fromShown, unitOf, type UnitSystem } from '@/lib/records/units';

type Place = 'exif' | 'position' | 'chainage';
type Status = { kind: 'idle' } | { kind: 'sending'; sent: number; total: number } | { kind: 'saved'; text: string } | { kind: 'error'; text: string; field?: string; fieldText?: string };

interface Answer {
  status: number;
  body: { photo?: { routeRef: string; chainageM: number; placedBy: string }; error?: { code: string; message: string; details?: { path: string; message: string }[] } } | null;
}

/** Sends the form with XMLHttpRequest, for its upload progress (fetch has none). */
function send(url: string, data: FormData, onProgress: (sent: number, total: number) => void): Promise<Answer> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.upload.onprogress = (e) => onProgress(e.loaded, e.total);
    xhr.onload = () => {
      let body = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      resolve({ status: xhr.status, body });
    };
    xhr.onerror = () => resolve({ status: 0, body: null });
    xhr.send(data);
  });
}

/**
 * A photo from the phone's camera or files: placed from its own GPS position when it has one, else from
 * "use my position" or a route and chainage; optionally showing a road crossing. The file itself cannot be
 * kept as a draft in the browser, so the form keeps it selected until the server has it.
 */
export function PhotoUploadForm({ projectId, routes, crossings, system = 'metric', map }: { projectId: string; routes: { id: string; label: string }[]; crossings: { id: string; label: string }[]; system?: UnitSystem; map?: { routes: FeatureCollection; colour: string } }) {
  const router = useRouter();
  const id = useId();
  const fileRef = useRef<HTMLInputElement>(null);
  const [place, setPlace] = useState<Place>('exif');
  const [lon, setLon] = useState('');
  const [lat, setLat] = useState('');
  const [routeId, setRouteId] = useState('');
  const [chainage, setChainage] = useState('');
  const [caption, setCaption] = useState('');
  const [crossingId, setCrossingId] = useState('');
  const [note, setNote] = useState<string | null>(null);
  const [status, setStatus] = useState<Status>({ kind: 'idle' });

  function locate() {
    if (!('geolocation' in navigator)) return setNote('This browser cannot give a position: pick the route and chainage instead.');
    setNote('Finding your position…');
    navigator.geolocation.getCurrentPosition(
      (p) => {
        setLon(p.coords.longitude.toFixed(7));
        setLat(p.coords.latitude.toFixed(7));
        setNote(`Position taken (±${Math.round(p.coords.accuracy)} m as the phone reports it).`);
      },
      (e) => setNote(e.code === e.PERMISSION_DENIED ? 'Position not allowed: allow it in the browser, or pick the route and chainage.' : 'No position could be found: pick the route and chainage instead.'),
      { enableHighAccuracy: true, timeout: 15000, maximumAge: 0 },
    );
  }

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    const file = fileRef.current?.files?.[0];
    if (!file) return setStatus({ kind: 'error', text: 'Take or pick a photo first.', field: 'file' });
    if (file.size > PHOTO_MAX_BYTES) return setStatus({ kind: 'error', text: `The photo is ${(file.size / 1048576).toFixed(0)} MB; at most ${PHOTO_MAX_BYTES / 1048576} MB are taken.`, field: 'file' });
    const data = new FormData();
    data.set('caption', caption);
    if (crossingId) data.set('crossingId', crossingId);
    if (place === 'position') {
      data.set('lon', lon);
      data.set('lat', lat);
    }
    if (place === 'chainage') {
      data.set('routeId', routeId);
      // typed in the shown unit, stored in metres
      const n = Number(chainage.replace(',', '.'));
      data.set('chainageM', chainage.trim() === '' || !Number.isFinite(n) ? chainage : String(fromShown(n, 'length', system)));
    }
    data.set('file', file, file.name);
    setStatus({ kind: 'sending', sent: 0, total: file.size });
    const res = await send(`/api/projects/${projectId}/photos`, data, (sent, total) => setStatus({ kind: 'sending', sent, total }));
    if (res.status === 201 || res.status === 200) {
      const p = res.body?.photo;
      setStatus({ kind: 'saved', text: res.status === 200 ? 'This photo was already stored.' : `Stored on ${p?.routeRef} at ${p?.chainageM.toFixed(1)} m${p?.placedBy === 'exif' ? ', placed from its own GPS position' : ''}.` });
      if (fileRef.current) fileRef.current.value = '';
      setCaption('');
      router.refresh();
      return;
    }
    if (res.status === 0) return setStatus({ kind: 'error', text: 'The server could not be reached: the photo is still selected, send it again when the connection is back.' });
    const err = res.body?.error;
    if (err?.code === 'position_required') setPlace('position');
    setStatus({ kind: 'error', text: err?.message ?? `The photo was refused (${res.status}).`, field: err?.details?.[0]?.path, fieldText: err?.details?.[0]?.message });
  }

  const fieldError = (name: string) => (status.kind === 'error' && status.field === name ? (status.fieldText ?? status.text) : undefined);
  const big = 'min-h-12 text-base';
  return (
    <form aria-label="Add a photo" className="flex max-w-xl flex-col gap-4" noValidate onSubmit={submit}>
      <Field label="Photo (JPEG or PNG)" htmlFor={`${id}-file`} error={fieldError('file')}>
        <input ref={fileRef} id={`${id}-file`} name="file" type="file" accept="image/jpeg,image/png" capture="environment" className="block min-h-12 w-full text-base" />
      </Field>
      <Field label="Caption" htmlFor={`${id}-caption`}>
        <Input id={`${id}-caption`} value={caption} onChange={(e) => setCaption(e.target.value)} maxLength={500} className={big} />
      </Field>
      <Field label="Shows road crossing (optional)" htmlFor={`${id}-crossing`}>
        <Select id={`${id}-crossing`} value={crossingId} onChange={(e) => setCrossingId(e.target.value)} className={big}>
          <option value="">None</option>
          {crossings.map((c) => (
            <option key={c.id} value={c.id}>
              {c.label}
            </option>
          ))}
        </Select>
      </Field>
      <fieldset className="flex flex-col gap-3">
        <legend className="mb-2 text-sm font-medium">Where</legend>
        <div className="flex flex-col gap-2 sm:flex-row" role="group" aria-label="Place by">
          {([['exif', "The photo's own GPS"], ['position', 'My position or the map'], ['chainage', 'Route and chainage']] as [Place, string][]).map(([v, label]) => (
            <Button key={v} type="button" variant={place === v ? 'primary' : 'secondary'} className="min-h-12 flex-1" onClick={() => setPlace(v)} aria-pressed={place === v}>
              {label}
            </Button>
          ))}
        </div>
        {place === 'exif' && <p className="text-sm text-ink-soft">Placed where the camera says it was taken; without a GPS position in the photo you are asked for one.</p>}
        {place === 'position' && (
          <>
            <Button type="button" variant="secondary" className={big} onClick={locate}>
              Use my position
            </Button>
            {note && <p className="text-sm text-ink-soft" aria-live="polite">{note}</p>}
            {map && (
              <PlacePicker
                label="Map to place the photo"
                routes={map.routes}
                routeColour={map.colour}
                picked={Number.isFinite(parseFloat(lon)) && Number.isFinite(parseFloat(lat)) ? [parseFloat(lon), parseFloat(lat)] : null}
                onPick={(x, y) => {
                  setLon(String(x));
                  setLat(String(y));
                  setNote('Placed where you tapped.');
                }}
                height={260}
              />
            )}
            <Field label="Longitude (°)" htmlFor={`${id}-lon`} error={fieldError('lon')}>
              <Input id={`${id}-lon`} inputMode="decimal" value={lon} onChange={(e) => setLon(e.target.value)} className={big} />
            </Field>
            <Field label="Latitude (°)" htmlFor={`${id}-lat`} error={fieldError('lat')}>
              <Input id={`${id}-lat`} inputMode="decimal" value={lat} onChange={(e) => setLat(e.target.value)} className={big} />
            </Field>
          </>
        )}
        {place === 'chainage' && (
          <>
            <Field label="Route" htmlFor={`${id}-route`} error={fieldError('routeId')}>
              <Select id={`${id}-route`} value={routeId} onChange={(e) => setRouteId(e.target.value)} className={big}>
                <option value="">Pick the route</option>
                {routes.map((r) => (
                  <option key={r.id} value={r.id}>
                    {r.label}
                  </option>
                ))}
              </Select>
            </Field>
            <Field label={`Chainage (${unitOf('length', system)})`} htmlFor={`${id}-chainage`} error={fieldError('chainageM')}>
              <Input id={`${id}-chainage`} inputMode="decimal" value={chainage} onChange={(e) => setChainage(e.target.value)} className={big} />
            </Field>
          </>
        )}
      </fieldset>
      <Button type="submit" className="min-h-12 w-full text-base sm:w-auto" disabled={status.kind === 'sending'}>
        {status.kind === 'sending' ? 'Sending…' : 'Add photo'}
      </Button>
      <div aria-live="polite">
        {status.kind === 'sending' && (
          <progress className="h-2 w-full" max={status.total || 1} value={status.sent} aria-label="Upload progress" />
        )}
        {status.kind === 'saved' && <Notice tone="ok">{status.text}</Notice>}
        {status.kind === 'error' && <Notice tone="bad">{status.text}</Notice>}
      </div>
    </form>
  );
}
