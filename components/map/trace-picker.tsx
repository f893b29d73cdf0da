'use client';

import maplibregl from 'maplibre-gl';
import { useEffect, useRef, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { createBaseMap, MapFrame } from './map-frame';

export interface TraceFix {
  lon: number;
  lat: number;
  /** epoch seconds, null when the file gave no time */
  t: number | null;
  alongM: number;
  trace: number;
}

/** Colours along the walk, first fix light to last fix dark (a sequential ramp that reads without hue). */
const RAMP = ['#9ecae1', '#4292c6', '#2171b5', '#08306b'];
const PICKED = '#d55e00';

/**
 * The upload's fixes on a map, coloured from the first to the last; pointing at a fix tells its time and
 * distance along the trace, clicking it hands it to `onPick` (the form fills "from", then "to"), and the
 * fixes in the picked range are drawn in a colour of their own.
 */
export function TracePicker({ fixes, planned, describe, inRange, onPick, label }: {
  fixes: TraceFix[];
  planned?: FeatureCollection;
  describe: (f: TraceFix) => string;
  inRange: (f: TraceFix) => boolean;
  onPick: (f: TraceFix) => void;
  label: string;
}) {
  const ref = useRef<HTMLDivElement>(null);
  const mapRef = useRef<maplibregl.Map | null>(null);
  const handlers = useRef({ describe, onPick });
  handlers.current = { describe, onPick };
  const [ready, setReady] = useState(false);

  useEffect(() => {
    if (!ref.current || fixes.length === 0) return;
    const map = createBaseMap(ref.current, { center: [fixes[0].lon, fixes[0].lat], zoom: 16 });
    mapRef.current = map;
    const n = fixes.length;
    const points: FeatureCollection = {
      type: 'FeatureCollection',
      features: fixes.map((f, i) => ({ type: 'Feature', id: i, properties: { i, k: n > 1 ? i / (n - 1) : 0, picked: false }, geometry: { type: 'Point', coordinates: [f.lon, f.lat] } })),
    };
    const lines: FeatureCollection = { type: 'FeatureCollection', features: [] };
    for (const t of [...new Set(fixes.map((f) => f.trace))]) {
      const coords = fixes.filter((f) => f.trace === t).map((f) => [f.lon, f.lat]);
      if (coords.length > 1) lines.features.push({ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: coords } });
    }
    const popup = new maplibregl.Popup({ closeButton: false, closeOnClick: false, offset: 8 });
    map.on('load', () => {
      if (planned) {
        map.addSource('planned', { type: 'geojson', data: planned });
        map.addLayer({ id: 'planned-line', type: 'line', source: 'planned', paint: { 'line-color': '#999999', 'line-width': 2, 'line-dasharray': [2, 2] } });
      }
      map.addSource('trace', { type: 'geojson', data: lines });
      map.addLayer({ id: 'trace-line', type: 'line', source: 'trace', paint: { 'line-color': '#6baed6', 'line-width': 1.5 } });
      map.addSource('fixes', { type: 'geojson', data: points });
      map.addLayer({
        id: 'fixes',
        type: 'circle',
        source: 'fixes',
        paint: {
          'circle-radius': ['case', ['boolean', ['feature-state', 'picked'], false], 5, 3.5],
          'circle-color': ['case', ['boolean', ['feature-state', 'picked'], false], PICKED, ['interpolate', ['linear'], ['get', 'k'], 0, RAMP[0], 0.33, RAMP[1], 0.66, RAMP[2], 1, RAMP[3]]],
          'circle-stroke-color': '#ffffff',
          'circle-stroke-width': 1,
        },
      });
      let w = Infinity, s = Infinity, e = -Infinity, nn = -Infinity;
      for (const f of fixes) { w = Math.min(w, f.lon); e = Math.max(e, f.lon); s = Math.min(s, f.lat); nn = Math.max(nn, f.lat); }
      map.fitBounds([[w, s], [e, nn]], { padding: 40, maxZoom: 19, duration: 0 });
    });
    map.on('mousemove', 'fixes', (ev) => {
      const i = Number(ev.features?.[0]?.properties?.i);
      map.getCanvas().style.cursor = 'pointer';
      popup.setLngLat([fixes[i].lon, fixes[i].lat]).setText(handlers.current.describe(fixes[i])).addTo(map);
    });
    map.on('mouseleave', 'fixes', () => {
      map.getCanvas().style.cursor = '';
      popup.remove();
    });
    map.on('click', (ev) => {
      // the fix nearest the click within a finger's width, so a tap need not land on a 7-pixel dot
      const box: [maplibregl.PointLike, maplibregl.PointLike] = [[ev.point.x - 12, ev.point.y - 12], [ev.point.x + 12, ev.point.y + 12]];
      const hits = map.queryRenderedFeatures(box, { layers: ['fixes'] });
      if (!hits.length) return;
      const near = hits
        .map((h) => Number(h.properties?.i))
        .sort((a, b) => {
          const pa = map.project([fixes[a].lon, fixes[a].lat]);
          const pb = map.project([fixes[b].lon, fixes[b].lat]);
          return Math.hypot(pa.x - ev.point.x, pa.y - ev.point.y) - Math.hypot(pb.x - ev.point.x, pb.y - ev.point.y);
        })[0];
      handlers.current.onPick(fixes[near]);
    });
    map.on('idle', () => {
      setReady(true);
      // for the browser tests, as GeoMap's __map: where fix i is drawn, in pixels of the map's canvas
      (window as unknown as { __tracePicker?: unknown }).__tracePicker = { count: fixes.length, pixelOf: (i: number) => map.project([fixes[i].lon, fixes[i].lat]) };
    });
    return () => {
      popup.remove();
      map.remove();
      mapRef.current = null;
    };
  }, [fixes, planned]);

  // the picked range is drawn through feature state: no new map for each pick
  useEffect(() => {
    const map = mapRef.current;
    if (!map) return;
    const apply = () => fixes.forEach((f, i) => map.setFeatureState({ source: 'fixes', id: i }, { picked: inRange(f) }));
    if (map.getSource('fixes')) apply();
    else map.once('load', apply);
  }, [fixes, inRange]);

  return (
    <MapFrame
      mapRef={ref}
      label={label}
      ready={ready}
      height="min(380px, 60vh)"
      legend={
        <>
          <span className="mr-2 inline-flex items-center gap-1 align-middle">
            first fix
            <span aria-hidden="true" className="inline-block h-2 w-16 rounded" style={{ background: `linear-gradient(to right, ${RAMP.join(', ')})` }} />
            last fix
          </span>
          <span className="mr-2 inline-flex items-center gap-1 align-middle"><span aria-hidden="true" className="inline-block h-2 w-2 rounded-full" style={{ background: PICKED }} /> in the picked range</span>
        </>
      }
    />
  );
}
