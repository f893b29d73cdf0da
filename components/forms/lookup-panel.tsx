'use client';

import { useEffect, useMemo, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { LookupMap } from '@/components/map/lookup-map';
import { Cautions } from '@/components/ui/cautions';
import { Button, Input } from '@/components/ui/primitives';
import type { NearbyResult, Stretch } from '@/lib/services/lookup';

interface Candidate { id: string; projectName: string; street: string; number: string; postcode: string; locality: string; lon: number; lat: number; score: number }
type Spot = { lon: number; lat: number; addressId?: string; label: string };

const m = (x: number | null | undefined, d = 2) => (x === null || x === undefined ? '—' : `${x.toFixed(d)} m`);
const REVIEW: Record<string, string> = { pending: 'awaiting review', approved: 'approved', rejected: 'rejected', acknowledged: 'acknowledged' };

async function getJson<T>(url: string): Promise<T> {
  const r = await fetch(url, { headers: { accept: 'application/json' } });
  const body = await r.json();
  if (!r.ok) throw new Error(body?.error?.message ?? `HTTP ${r.status}`);
  return body as T;
}

/** Search, pick or tap a spot; the stretches near it with what is recorded about them; a printable sheet. */
export function LookupPanel() {
  const [q, setQ] = useState('');
  const [candidates, setCandidates] = useState<Candidate[]>([]);
  const [spot, setSpot] = useState<Spot | null>(null);
  const [lonText, setLonText] = useState('');
  const [latText, setLatText] = useState('');
  const [result, setResult] = useState<NearbyResult | null>(null);
  const [order, setOrder] = useState<'distance' | 'could_be'>('distance');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  // results as you type, 250 ms after the last key
  useEffect(() => {
    if (q.trim().length < 2) {
      setCandidates([]);
      return;
    }
    const t = setTimeout(() => {
      getJson<{ candidates: Candidate[] }>(`/api/lookup/addresses?q=${encodeURIComponent(q.trim())}`).then((b) => setCandidates(b.candidates), (e: Error) => setError(e.message));
    }, 250);
    return () => clearTimeout(t);
  }, [q]);

  useEffect(() => {
    if (!spot) return;
    setBusy(true);
    setError(null);
    const qs = new URLSearchParams({ lon: String(spot.lon), lat: String(spot.lat), order });
    if (spot.addressId) qs.set('addressId', spot.addressId);
    getJson<NearbyResult>(`/api/lookup/nearby?${qs}`).then(setResult, (e: Error) => setError(e.message)).finally(() => setBusy(false));
  }, [spot, order]);

  const layers = useMemo(() => {
    const fc = (features: GeoJSON.Feature[]): FeatureCollection => ({ type: 'FeatureCollection', features });
    const s = result?.stretches ?? [];
    return {
      sections: fc(s.map((x) => ({ type: 'Feature', properties: { id: x.id }, geometry: { type: 'LineString', coordinates: x.coords } }))),
      bands: fc(s.filter((x) => x.band).map((x) => ({ type: 'Feature', properties: { id: x.id }, geometry: x.band! }))),
      crossings: fc((result?.crossings ?? []).map((c) => ({ type: 'Feature', properties: { ref: c.routeRef }, geometry: { type: 'LineString', coordinates: c.coords } }))),
      points: fc((result?.nearby ?? []).map((p) => ({ type: 'Feature', properties: { kind: p.kind }, geometry: { type: 'Point', coordinates: [p.lon, p.lat] } }))),
    };
  }, [result]);

  const pickCoords = () => {
    const lon = Number(lonText), lat = Number(latText);
    if (!/^-?\d+(\.\d+)?$/.test(lonText.trim()) || !/^-?\d+(\.\d+)?$/.test(latText.trim()) || Math.abs(lon) > 180 || Math.abs(lat) > 90) {
      setError('Type the longitude (−180 to 180) and latitude (−90 to 90) in decimal degrees, WGS 84.');
      return;
    }
    setSpot({ lon, lat, label: `${lat.toFixed(6)}, ${lon.toFixed(6)}` });
  };

  const useMyPosition = () => {
    if (!navigator.geolocation) return setError('This browser does not give its position.');
    navigator.geolocation.getCurrentPosition(
      (p) => setSpot({ lon: Number(p.coords.longitude.toFixed(7)), lat: Number(p.coords.latitude.toFixed(7)), label: `my position (±${Math.round(p.coords.accuracy)} m)` }),
      (e) => setError(`No position: ${e.message}`),
      { enableHighAccuracy: true, timeout: 15000 },
    );
  };

  return (
    <div className="space-y-4" data-testid="lookup">
      <div className="space-y-3 print:hidden">
        <label className="block text-sm font-medium" htmlFor="lookup-q">Address</label>
        <Input id="lookup-q" type="search" autoComplete="off" placeholder="e.g. Lanternfield Road 12" value={q} onChange={(e) => setQ(e.target.value)} />
        {candidates.length > 0 && (
          <ul aria-label="Addresses found" className="divide-y divide-ink/10 rounded-md border border-ink/10 bg-paper-raised">
            {candidates.map((c) => (
              <li key={c.id}>
                <button
                  type="button"
                  className="w-full px-3 py-2 text-left text-sm hover:bg-brand/10"
                  onClick={() => {
                    setSpot({ lon: c.lon, lat: c.lat, addressId: c.id, label: `${c.street} ${c.number}${c.postcode ? `, ${c.postcode}` : ''}` });
                    setCandidates([]);
                  }}
                >
                  <span className="font-medium">{c.street} {c.number}</span>
                  <span className="text-ink-soft">{c.postcode || c.locality ? `, ${[c.postcode, c.locality].filter(Boolean).join(' ')}` : ''} · {c.projectName}</span>
                </button>
              </li>
            ))}
          </ul>
        )}
        <div className="flex flex-wrap items-end gap-2">
          <Button type="button" onClick={useMyPosition}>Use my position</Button>
          <label className="text-sm">Longitude <Input aria-label="Longitude" inputMode="decimal" className="w-32" value={lonText} onChange={(e) => setLonText(e.target.value)} /></label>
          <label className="text-sm">Latitude <Input aria-label="Latitude" inputMode="decimal" className="w-32" value={latText} onChange={(e) => setLatText(e.target.value)} /></label>
          <Button type="button" onClick={pickCoords}>Look up</Button>
        </div>
      </div>
      {error && <p role="alert" className="text-sm text-status-bad">{error}</p>}

      <section aria-label="Lookup sheet" className="lookup-sheet space-y-3">
        <h2 className="text-lg font-semibold">
          {spot ? `Ducts near ${spot.label}` : 'Pick an address, tap the map or use your position'}
          {result ? <span className="ml-2 text-sm font-normal text-ink-soft">within {result.radiusM} m · {new Date().toLocaleDateString('en-GB')}</span> : null}
        </h2>
        <LookupMap spot={spot ? [spot.lon, spot.lat] : null} {...layers} onPick={(lon, lat) => setSpot({ lon, lat, label: `${lat.toFixed(6)}, ${lon.toFixed(6)}` })} />
        {result && (
          <>
            <div className="flex items-center gap-3 text-sm print:hidden">
              <label>
                Sort by{' '}
                <select aria-label="Sort by" value={order} onChange={(e) => setOrder(e.target.value as 'distance' | 'could_be')} className="rounded border border-ink/20 px-2 py-1">
                  <option value="distance">distance</option>
                  <option value="could_be">could be this close</option>
                </select>
              </label>
              <Button type="button" onClick={() => window.print()}>Print sheet</Button>
              {busy && <span role="status">Looking…</span>}
            </div>
            {result.stretches.length === 0 ? (
              <p data-testid="no-stretches">No ducts of your organisation’s networks are recorded within {result.radiusM} m.</p>
            ) : (
              <ol aria-label="Stretches" className="space-y-2">
                {result.stretches.map((s) => <StretchItem key={s.id} s={s} />)}
              </ol>
            )}
            {result.nearby.length > 0 && (
              <div className="text-sm">
                <h3 className="font-medium">Other utilities and test pits recorded nearby</h3>
                <ul className="list-disc pl-5">
                  {result.nearby.map((p) => (
                    <li key={p.id}>{p.label}{p.owner ? ` (${p.owner})` : ''}: {m(p.distanceM, 1)} away, depth {m(p.depthM)}{p.kind === 'utility' ? `, clearance ${m(p.clearanceM)}` : ''}</li>
                  ))}
                </ul>
              </div>
            )}
            <p className="text-xs text-ink-soft" data-testid="accuracy-statement">
              Accuracy: each stretch’s radius is the 95 % horizontal radius of its recorded position (2.4477 σ of the survey’s accuracy class: about ±0.05 m where surveyed by RTK GNSS, ±10 m where walked with a handheld receiver); “could be this close” is the distance less that radius. Distances are geodesic (WGS 84).
            </p>
          </>
        )}
        <Cautions kinds={['lookup', 'utilities']} />
      </section>
    </div>
  );
}

const HANDOVER: Record<string, string> = { issued: 'issued, awaiting the owner', accepted: 'accepted by the owner', returned: 'returned by the owner' };

function StretchItem({ s }: { s: Stretch }) {
  return (
    <li className="rounded-md border border-ink/10 bg-paper-raised p-3 text-sm break-inside-avoid" data-testid="stretch">
      <div className="flex flex-wrap items-baseline justify-between gap-x-3">
        <span className="font-semibold">{s.routeRef ?? 'unplanned line'}{s.street ? ` · ${s.street}` : ''}</span>
        <span><b data-testid="distance">{m(s.distanceM, 1)}</b> away · could be {m(s.couldBeThisCloseM, 1)}</span>
      </div>
      <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5">
        <dt className="text-ink-soft">Side</dt>
        <dd>{s.side === null ? '—' : s.side === 'on' ? 'on the line' : `${s.side} of the route’s direction`}{s.sideOfAddress ? ` (${s.sideOfAddress})` : ''}</dd>
        <dt className="text-ink-soft">Cover</dt>
        <dd data-testid="cover">{s.cover.nearest.length ? s.cover.nearest.map((c) => `${c.coverM.toFixed(2)} m at ${c.chainageM.toFixed(0)} m`).join(', ') : 'no readings'}{s.cover.shallowestM !== null ? `; shallowest ${s.cover.shallowestM.toFixed(2)} m` : ''}</dd>
        <dt className="text-ink-soft">Ducts</dt>
        <dd data-testid="ducts">
          {s.ducts.length === 0 ? 'not recorded' : s.ducts.map((b, i) => (
            <span key={i} className="mr-2">
              {b.summary}{b.kind === 'planned' ? ' (planned)' : ''}:{' '}
              {b.ducts.map((d) => (
                <span key={d.position} className="mr-1 inline-flex items-center gap-0.5" title={d.colour ?? ''}>
                  <span aria-hidden="true" className="inline-block h-3 w-3 rounded-full border border-ink/30" style={{ background: d.colourHex ?? 'transparent' }} />
                  {d.colour ?? `#${d.position}`}
                </span>
              ))}
            </span>
          ))}
        </dd>
        <dt className="text-ink-soft">Position</dt>
        <dd data-testid="radius">{s.radiusM === null ? 'radius unknown' : `±${s.radiusM.toFixed(2)} m (95 %)`}, from {s.radiusSource}</dd>
        <dt className="text-ink-soft">Laid</dt>
        <dd>{s.laidOn ?? '—'} · {REVIEW[s.review] ?? s.review} · {s.handoverRevision === null ? 'not handed over yet' : `in handover revision ${s.handoverRevision.revision} (${HANDOVER[s.handoverRevision.status] ?? s.handoverRevision.status})`}</dd>
        <dt className="text-ink-soft">Network</dt>
        <dd>{s.projectName} · owner {s.ownerOrganisation}{s.ownerContact ? ` · ${s.ownerContact}` : ''}</dd>
      </dl>
    </li>
  );
}
