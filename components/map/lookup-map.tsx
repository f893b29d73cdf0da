'use client';

import maplibregl from 'maplibre-gl';
import { useEffect, useRef, useState } from 'react';
import type { FeatureCollection } from 'geojson';
import { createBaseMap, MapFrame } from './map-frame';

const EMPTY: FeatureCollection = { type: 'FeatureCollection', features: [] };
export const LOOKUP_COLOURS = { section: '#0072b2', band: '#56b4e9', crossing: '#009e73', pit: '#e69f00', utility: '#cc79a7', spot: '#d55e00' };

/**
 * The lookup's map: the 95 % band of each stretch drawn as a geodesic buffer polygon (the server's PostGIS
 * geography buffer, so it stays true at every zoom), the sections over it, crossings, pits and utilities, and
 * the spot. A tap hands over a new spot. The data is swapped in place; the map is made once.
 */
export function LookupMap({ spot, sections, bands, crossings, points, onPick }: {
  spot: [number, number] | null;
  sections: FeatureCollection;
  bands: FeatureCollection;
  crossings: FeatureCollection;
  points: FeatureCollection;
  onPick: (lon: number, lat: number) => void;
}) {
  const ref = useRef<HTMLDivElement>(null);
  const map = useRef<maplibregl.Map | null>(null);
  const marker = useRef<maplibregl.Marker | null>(null);
  const pick = useRef(onPick);
  pick.current = onPick;
  const [ready, setReady] = useState(false);
  const [loaded, setLoaded] = useState(false);

  useEffect(() => {
    if (!ref.current) return;
    const m = createBaseMap(ref.current, { center: [0, 0], zoom: 1 });
    map.current = m;
    m.on('load', () => {
      for (const id of ['bands', 'sections', 'crossings', 'points']) m.addSource(id, { type: 'geojson', data: EMPTY });
      m.addLayer({ id: 'bands', type: 'fill', source: 'bands', paint: { 'fill-color': LOOKUP_COLOURS.band, 'fill-opacity': 0.3 } });
      m.addLayer({ id: 'crossings', type: 'line', source: 'crossings', paint: { 'line-color': LOOKUP_COLOURS.crossing, 'line-width': 3, 'line-dasharray': [2, 1] } });
      m.addLayer({ id: 'sections', type: 'line', source: 'sections', paint: { 'line-color': LOOKUP_COLOURS.section, 'line-width': 3 } });
      m.addLayer({
        id: 'points', type: 'circle', source: 'points',
        paint: { 'circle-color': ['match', ['get', 'kind'], 'pit', LOOKUP_COLOURS.pit, LOOKUP_COLOURS.utility], 'circle-radius': 5, 'circle-stroke-color': '#ffffff', 'circle-stroke-width': 1 },
      });
      setLoaded(true);
    });
    m.on('click', (e) => pick.current(Number(e.lngLat.lng.toFixed(7)), Number(e.lngLat.lat.toFixed(7))));
    m.on('idle', () => setReady(true));
    return () => {
      m.remove();
      map.current = null;
      marker.current = null;
    };
  }, []);

  useEffect(() => {
    const m = map.current;
    if (!m || !loaded) return;
    (m.getSource('bands') as maplibregl.GeoJSONSource).setData(bands);
    (m.getSource('sections') as maplibregl.GeoJSONSource).setData(sections);
    (m.getSource('crossings') as maplibregl.GeoJSONSource).setData(crossings);
    (m.getSource('points') as maplibregl.GeoJSONSource).setData(points);
    if (spot) {
      marker.current ??= new maplibregl.Marker({ color: LOOKUP_COLOURS.spot });
      marker.current.setLngLat(spot).addTo(m);
      m.jumpTo({ center: spot, zoom: Math.max(m.getZoom(), 17.5) });
    }
  }, [loaded, spot, sections, bands, crossings, points]);

  return (
    <MapFrame
      mapRef={ref}
      label="Duct lookup map"
      ready={ready}
      height="min(360px, 50vh)"
      legend={
        <>
          <span style={{ color: LOOKUP_COLOURS.section }}>━</span> as-built ducts · <span style={{ color: LOOKUP_COLOURS.band }}>▇</span> 95 % band ·{' '}
          <span style={{ color: LOOKUP_COLOURS.crossing }}>╍</span> road crossings · <span style={{ color: LOOKUP_COLOURS.pit }}>●</span> test pits ·{' '}
          <span style={{ color: LOOKUP_COLOURS.utility }}>●</span> other utilities · <span style={{ color: LOOKUP_COLOURS.spot }}>▼</span> the spot. Tap the map to look up another spot.{' '}
        </>
      }
    />
  );
}
