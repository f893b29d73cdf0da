'use client';

import { useEffect, useRef, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { createBaseMap, MapFrame } from './map-frame';

export interface MapLayer {
  id: string;
  data: FeatureCollection;
  colour: string;
  dashed?: boolean;
  width?: number;
  /** points: the circle's radius (default 4), and hollow (a ring in the colour) so a status differs by shape too */
  pointRadius?: number;
  hollow?: boolean;
}

function bounds(layers: MapLayer[]): [number, number, number, number] | null {
  let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
  const visit = (c: unknown): void => {
    if (Array.isArray(c) && typeof c[0] === 'number') {
      const [x, y] = c as number[];
      w = Math.min(w, x); e = Math.max(e, x); s = Math.min(s, y); n = Math.max(n, y);
    } else if (Array.isArray(c)) c.forEach(visit);
  };
  for (const l of layers) for (const f of l.data.features) if (f.geometry && 'coordinates' in f.geometry) visit(f.geometry.coordinates);
  return Number.isFinite(w) ? [w, s, e, n] : null;
}

/** A map of GeoJSON layers over a plain background: no external basemap or tiles are needed. */
export function GeoMap({ layers, label, height = 420 }: { layers: MapLayer[]; label: string; height?: number }) {
  const ref = useRef<HTMLDivElement>(null);
  const [ready, setReady] = useState(false);
  useEffect(() => {
    if (!ref.current) return;
    setReady(false);
    const map = createBaseMap(ref.current, { center: [0, 0], zoom: 1 });
    map.on('load', () => {
      for (const l of layers) {
        map.addSource(l.id, { type: 'geojson', data: l.data });
        map.addLayer({
          id: `${l.id}-line`, type: 'line', source: l.id, filter: ['==', ['geometry-type'], 'LineString'],
          paint: { 'line-color': l.colour, 'line-width': l.width ?? 3, ...(l.dashed ? { 'line-dasharray': [2, 2] } : {}) },
        });
        map.addLayer({
          id: `${l.id}-point`, type: 'circle', source: l.id, filter: ['==', ['geometry-type'], 'Point'],
          paint: l.hollow
            ? { 'circle-color': '#ffffff', 'circle-radius': l.pointRadius ?? 4, 'circle-stroke-color': l.colour, 'circle-stroke-width': 2 }
            : { 'circle-color': l.colour, 'circle-radius': l.pointRadius ?? 4, 'circle-stroke-color': '#ffffff', 'circle-stroke-width': 1 },
        });
      }
      const b = bounds(layers);
      if (b) map.fitBounds([[b[0], b[1]], [b[2], b[3]]], { padding: 40, maxZoom: 19, duration: 0 });
    });
    map.on('idle', () => {
      setReady(true);
      (window as unknown as { __map?: { loaded: boolean } }).__map = { loaded: true };
    });
    return () => map.remove();
  }, [layers]);
  return <MapFrame mapRef={ref} label={label} ready={ready} height={`min(${height}px, 65vh)`} />;
}
