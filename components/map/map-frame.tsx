'use client';

import maplibregl from 'maplibre-gl';
import 'maplibre-gl/dist/maplibre-gl.css';
import type { ReactNode, RefObject } from 'react';

/**
 * A maplibre map over a plain background (no external basemap or tiles), with zoom buttons and a metric
 * scale. On a touch screen one finger scrolls the page and two move the map, so the map is no scroll trap.
 */
export function createBaseMap(container: HTMLElement, view: { center: [number, number]; zoom: number }): maplibregl.Map {
  const map = new maplibregl.Map({
    container,
    style: { version: 8, sources: {}, layers: [{ id: 'paper', type: 'background', paint: { 'background-color': '#f1efe8' } }] },
    center: view.center,
    zoom: view.zoom,
    attributionControl: false,
    cooperativeGestures: window.matchMedia('(pointer: coarse)').matches,
  });
  map.addControl(new maplibregl.NavigationControl({ showCompass: false }), 'top-right');
  map.addControl(new maplibregl.ScaleControl({ unit: 'metric' }), 'bottom-left');
  return map;
}

/** The map's box with a loading sign until it is ready, and the caution under every map (after `legend`). */
export function MapFrame({ mapRef, label, ready, height, legend }: { mapRef: RefObject<HTMLDivElement | null>; label: string; ready: boolean; height: string; legend?: ReactNode }) {
  return (
    <figure>
      <div className="relative">
        <div ref={mapRef} role="region" aria-label={label} aria-busy={!ready} className="w-full overflow-hidden rounded-lg border border-ink/10" style={{ height }} />
        {!ready && (
          <div role="status" className="pointer-events-none absolute inset-0 flex items-center justify-center gap-2 rounded-lg bg-paper/70 text-sm text-ink-soft">
            <span aria-hidden="true" className="h-4 w-4 animate-spin rounded-full border-2 border-brand border-t-transparent" />
            Loading the map…
          </div>
        )}
      </div>
      <figcaption className="mt-1 text-xs text-ink-soft">
        {legend}
        Positions shown are records, not a locate. Before any digging, verify utilities on site (detection, hand-dug trial holes) and follow local codes and licensed practice.
      </figcaption>
    </figure>
  );
}
