'use client';

import maplibregl from 'maplibre-gl';
import 'maplibre-gl/dist/maplibre-gl.css';
import { useEffect, useRef } from 'react';
import type { FeatureCollection } from 'geojson';

export interface MapLayer {
  id: string;
  data: FeatureCollection;
  colour: string;
  dashed?: boolean;
  width?: number;
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
  useEffect(() => {
    if (!ref.current) return;
    const map = new maplibregl.Map({
      container: ref.current,
      style: { version: 8, sources: {}, layers: [{ id: 'paper', type: 'background', paint: { 'background-color': '#f1efe8' } }] },
      center: [0, 0],
      zoom: 1,
      attributionControl: false,
    });
    map.addControl(new maplibregl.NavigationControl({ showCompass: false }), 'top-right');
    map.addControl(new maplibregl.ScaleControl({ unit: 'metric' }), 'bottom-left');
    map.on('load', () => {
      for (const l of layers) {
        map.addSource(l.id, { type: 'geojson', data: l.data });
        map.addLayer({
          id: `${l.id}-line`, type: 'line', source: l.id, filter: ['==', ['geometry-type'], 'LineString'],
          paint: { 'line-color': l.colour, 'line-width': l.width ?? 3, ...(l.dashed ? { 'line-dasharray': [2, 2] } : {}) },
        });
        map.addLayer({
          id: `${l.id}-point`, type: 'circle', source: l.id, filter: ['==', ['geometry-type'], 'Point'],
          paint: { 'circle-color': l.colour, 'circle-radius': 4, 'circle-stroke-color': '#ffffff', 'circle-stroke-width': 1 },
        });
      }
      const b = bounds(layers);
      if (b) map.fitBounds([[b[0], b[1]], [b[2], b[3]]], { padding: 40, maxZoom: 19, duration: 0 });
    });
    map.on('idle', () => {
      (window as unknown as { __map?: { loaded: boolean } }).__map = { loaded: true };
    });
    return () => map.remove();
  }, [layers]);
  return (
    <figure>
      <div ref={ref} role="region" aria-label={label} className="w-full overflow-hidden rounded-lg border border-ink/10" style={{ height }} />
      <figcaption className="mt-1 text-xs text-ink-soft">
        Positions shown are records, not a locate. Before any digging, verify utilities on site (detection, hand-dug trial holes) and follow local codes and licensed practice.
      </figcaption>
    </figure>
  );
}
