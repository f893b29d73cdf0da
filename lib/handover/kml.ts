import { fmtCoord, fmtValue } from './geojson';
import type { LayerDef, LayerFeature } from './layers';

// KML 2.2 (OGC 07-147r2), namespace http://www.opengis.net/kml/2.2: one Document per layer, a Placemark per
// feature, the fields as ExtendedData/Data (§9.3), coordinates lon,lat in WGS 84 (§16.9).

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

export function kmlHeader(def: LayerDef): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n<kml xmlns="http://www.opengis.net/kml/2.2">\n<Document>\n<name>${esc(def.title)}</name>\n<Folder>\n<name>${esc(def.name)}</name>\n`;
}
export const KML_FOOTER = '</Folder>\n</Document>\n</kml>\n';

export function kmlPlacemark(def: LayerDef, ft: LayerFeature): string {
  const data = def.fields.map((fl) => {
    const v = ft.props[fl.name];
    const s = v === null || v === undefined ? '' : typeof v === 'number' ? fmtValue(v) : String(v);
    return `<Data name="${esc(fl.name)}"><value>${esc(s)}</value></Data>`;
  }).join('');
  const geom = def.geometry === 'Point'
    ? `<Point><coordinates>${fmtCoord((ft.coordinates as number[])[0])},${fmtCoord((ft.coordinates as number[])[1])}</coordinates></Point>`
    : `<LineString><coordinates>${(ft.coordinates as number[][]).map((p) => `${fmtCoord(p[0])},${fmtCoord(p[1])}`).join(' ')}</coordinates></LineString>`;
  const name = ft.props[def.fields[1]?.name ?? def.fields[0].name] ?? ft.props[def.fields[0].name];
  return `<Placemark><name>${esc(String(name ?? ''))}</name><ExtendedData>${data}</ExtendedData>${geom}</Placemark>\n`;
}

export async function writeKmlLayer(def: LayerDef, features: AsyncIterable<LayerFeature> | Iterable<LayerFeature>, write: (s: string) => Promise<void> | void): Promise<number> {
  let n = 0;
  await write(kmlHeader(def));
  for await (const ft of features) { await write(kmlPlacemark(def, ft)); n++; }
  await write(KML_FOOTER);
  return n;
}
