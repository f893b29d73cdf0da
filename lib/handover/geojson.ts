import type { LayerDef, LayerFeature } from './layers';

// RFC 7946 GeoJSON, streamed: one FeatureCollection per layer, WGS 84 lon/lat (no "crs" member, §4), at most
// 7 decimals (§11.2: about 1 cm), a bbox (§5), members in a fixed order and numbers in a fixed format.

/** A coordinate with at most 7 decimals, no exponent, no trailing zeros, no "-0". */
export function fmtCoord(x: number): string {
  const s = x.toFixed(7).replace(/\.?0+$/, '');
  return s === '-0' ? '0' : s;
}
/** An attribute number: at most 3 decimals (millimetres), fixed format. */
export function fmtValue(x: number): string {
  const s = (Math.round(x * 1000) / 1000).toFixed(3).replace(/\.?0+$/, '');
  return s === '-0' ? '0' : s;
}

const position = (p: number[]) => `[${fmtCoord(p[0])},${fmtCoord(p[1])}]`;

export function geometryJson(def: LayerDef, c: number[] | number[][]): string {
  if (def.geometry === 'Point') return `{"type":"Point","coordinates":${position(c as number[])}}`;
  return `{"type":"LineString","coordinates":[${(c as number[][]).map(position).join(',')}]}`;
}

export function propsJson(def: LayerDef, props: LayerFeature['props']): string {
  return `{${def.fields.map((fl) => {
    const v = props[fl.name];
    const val = v === null || v === undefined ? 'null' : typeof v === 'number' ? fmtValue(v) : typeof v === 'boolean' ? String(v) : JSON.stringify(v);
    return `${JSON.stringify(fl.name)}:${val}`;
  }).join(',')}}`;
}

export class BBox {
  w = Infinity; s = Infinity; e = -Infinity; n = -Infinity;
  add(c: number[] | number[][]) {
    const pts = typeof c[0] === 'number' ? [c as number[]] : (c as number[][]);
    for (const p of pts) {
      const x = Number(fmtCoord(p[0])), y = Number(fmtCoord(p[1]));
      if (x < this.w) this.w = x; if (x > this.e) this.e = x; if (y < this.s) this.s = y; if (y > this.n) this.n = y;
    }
  }
  get empty() { return this.w === Infinity; }
  json() { return `[${[this.w, this.s, this.e, this.n].map(fmtCoord).join(',')}]`; }
}

/**
 * Writes one layer as a FeatureCollection through `write`, feature by feature (memory flat); the bbox
 * (RFC 7946 §5) follows the features, as JSON members are unordered. An empty layer has no bbox.
 */
export async function writeGeoJsonLayer(def: LayerDef, features: AsyncIterable<LayerFeature> | Iterable<LayerFeature>, write: (s: string) => Promise<void> | void): Promise<{ count: number; bbox: number[] | null }> {
  const bbox = new BBox();
  let count = 0;
  await write(`{"type":"FeatureCollection","name":${JSON.stringify(def.name)},"features":[`);
  for await (const ft of features) {
    bbox.add(ft.coordinates);
    await write(`${count ? ',' : ''}\n{"type":"Feature","geometry":${geometryJson(def, ft.coordinates)},"properties":${propsJson(def, ft.props)}}`);
    count++;
  }
  await write(`\n]${bbox.empty ? '' : `,"bbox":${bbox.json()}`}}\n`);
  return { count, bbox: bbox.empty ? null : [bbox.w, bbox.s, bbox.e, bbox.n] };
}
