'use client';

import maplibregl from 'maplibre-gl';
import { useEffect, useRef, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { createBaseMap, MapFrame } from './map-frame';

const PHOTO_COLOUR = '#d55e00';

function boundsOf(fc: FeatureCollection): [[number, number], [number, number]] | null {
  let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
  const visit = (c: unknown): void => {
    if (Array.isArray(c) && typeof c[0] === 'number') {
      const [x, y] = c as number[];
      w = Math.min(w, x); e = Math.max(e, x); s = Math.min(s, y); n = Math.max(n, y);
    } else if (Array.isArray(c)) c.forEach(visit);
  };
  for (const f of fc.features) if (f.geometry && 'coordinates' in f.geometry) visit(f.geometry.coordinates);
  return Number.isFinite(w) ? [[w, s], [e, n]] : null;
}

/**
 * The planned routes and the photos on a map; with `onPick`, a tap places the marker and hands over its
 * position (the server snaps it to the nearest route). `routes` are lines, `photos` points with a `caption`.
 */
export function PlacePicker({ routes, photos, routeColour, picked, onPick, label, height = 320 }: {
  routes: FeatureCollection;
  photos?: FeatureCollection;
  routeColour: string;
  picked?: [number, number] | null;
  onPick?: (lon: number, lat: number) => void;
  label: string;
  height?: number;
}) {
  const ref = useRef<HTMLDivElement>(null);
  const map = useRef<maplibregl.Map | null>(null);
  const marker = useRef<maplibregl.Marker | null>(null);
  const pick = useRef(onPick);
  pick.current = onPick;
  const [ready, setReady] = useState(false);

  useEffect(() => {
    if (!ref.current) return;
    const b = boundsOf(routes);
    const m = createBaseMap(ref.current, { center: b ? [(b[0][0] + b[1][0]) / 2, (b[0][1] + b[1][1]) / 2] : [0, 0], zoom: b ? 16 : 1 });
    map.current = m;
    m.on('load', () => {
      m.addSource('routes', { type: 'geojson', data: routes });
      m.addLayer({ id: 'routes', type: 'line', source: 'routes', paint: { 'line-color': routeColour, 'line-width': 3 } });
      if (photos) {
        m.addSource('photos', { type: 'geojson', data: photos });
        m.addLayer({ id: 'photos', type: 'circle', source: 'photos', paint: { 'circle-color': PHOTO_COLOUR, 'circle-radius': 6, 'circle-stroke-color': '#ffffff', 'circle-stroke-width': 2 } });
      }
      if (b) m.fitBounds(b, { padding: 30, maxZoom: 19, duration: 0 });
    });
    m.on('click', (e) => {
      if (!pick.current) return;
      pick.current(Number(e.lngLat.lng.toFixed(7)), Number(e.lngLat.lat.toFixed(7)));
    });
    m.on('idle', () => setReady(true));
    return () => {
      m.remove();
      map.current = null;
      marker.current = null;
    };
  }, [routes, photos, routeColour]);

  useEffect(() => {
    const m = map.current;
    if (!m) return;
    if (!picked) {
      marker.current?.remove();
      marker.current = null;
      return;
    }
    marker.current ??= new maplibregl.Marker({ color: PHOTO_COLOUR });
    marker.current.setLngLat(picked).addTo(m);
  }, [picked]);

  return (
    <MapFrame
      mapRef={ref}
      label={label}
      ready={ready}
      height={`min(${height}px, 55vh)`}
      legend={
        <>
          <span style={{ color: routeColour }}>━</span> planned routes{photos ? <> · <span style={{ color: PHOTO_COLOUR }}>●</span> photos</> : null}
          {onPick ? ' · tap the map to place the photo. ' : '. '}
        </>
      }
    />
  );
}
