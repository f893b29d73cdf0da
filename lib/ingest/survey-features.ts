import { toUtcIso } from './utc-time';
import type { ColumnMap, ParsedFeature, Position } from './types';

/** One readable CSV row: its file line, the two coordinates as given, the height and a column getter. */
export interface Row {
  line: number;
  a: number; // x or lon
  b: number; // y or lat
  z: number | null;
  get: (key: keyof ColumnMap) => string | null;
}

const EXTRA_KEYS = [['id', 'id'], ['code', 'code'], ['fix', 'fix'], ['rmsH', 'rms_h'], ['rmsV', 'rms_v'], ['depth', 'depth']] as const;
const numeric = (k: string) => k.startsWith('rms') || k === 'depth';

/**
 * Turn rows into features, in file order. With a line column, rows sharing a non-empty line id
 * form a line; without one, rows sharing a code form a line when the code has ≥ 2 rows. Every
 * other row, and a line id with a single row (with a warning), is a point.
 *
 * @example
 * buildFeatures(rows, positions, { x: 'E', y: 'N', line: 'Line' }, warnings); // [{ kind: 'line', name: 'L1', … }, …]
 */
export function buildFeatures(rows: Row[], positions: Position[], map: ColumnMap, warnings: string[]): ParsedFeature[] {
  const groupKey: keyof ColumnMap | null = map.line ? 'line' : map.code ? 'code' : null;
  const groups = new Map<string, number[]>();
  if (groupKey) {
    rows.forEach((r, i) => {
      const k = r.get(groupKey);
      if (!k) return;
      const members = groups.get(k);
      if (members) members.push(i);
      else groups.set(k, [i]);
    });
  }
  const rmsNum = (s: string | null) => (s === null || !Number.isFinite(Number(s.replace(',', '.'))) ? s : Number(s.replace(',', '.')));
  const pointOf = (i: number): ParsedFeature => {
    const r = rows[i];
    const attributes: Record<string, unknown> = { row: r.line };
    for (const [k, out] of EXTRA_KEYS) if (map[k] && k !== 'id') attributes[out] = numeric(k) ? rmsNum(r.get(k)) : r.get(k);
    if (map.line) attributes.line = r.get('line');
    return { kind: 'point', name: r.get('id'), coord: positions[i], time: map.date ? toUtcIso(r.get('date')) : null, attributes };
  };
  const emitted = new Set<string>();
  const out: ParsedFeature[] = [];
  rows.forEach((r, i) => {
    const k = groupKey ? r.get(groupKey) : null;
    const members = k ? groups.get(k)! : null;
    if (!k || !members || members.length < 2) {
      if (k && groupKey === 'line') warnings.push(`line '${k}' has 1 point (row ${r.line}); kept as a point`);
      out.push(pointOf(i));
      return;
    }
    if (emitted.has(k)) return;
    emitted.add(k);
    const pointAttributes: Record<string, (string | number | null)[]> = {};
    for (const [key, name] of EXTRA_KEYS) {
      if (map[key]) pointAttributes[name] = members.map((m) => (numeric(key) ? rmsNum(rows[m].get(key)) : rows[m].get(key)));
    }
    const times = map.date ? members.map((m) => toUtcIso(rows[m].get('date'))) : null;
    out.push({
      kind: 'line',
      name: k,
      coords: members.map((m) => positions[m]),
      times: times && times.some((t) => t !== null) ? times : null,
      pointAttributes: Object.keys(pointAttributes).length ? pointAttributes : null,
      attributes: groupKey === 'line' ? { line: k } : { code: k },
    });
  });
  return out;
}
