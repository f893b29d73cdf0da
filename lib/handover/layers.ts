// The layers of a handover package (issue 16): their fields, units and shapefile short names (≤ 10
// characters, unique per layer, listed in the package's README.txt). Pure: no database, no files.

export type FieldType = 'string' | 'real' | 'integer' | 'date' | 'boolean';
export interface LayerField {
  name: string;
  /** the DBF field name: at most 10 characters, unique within the layer */
  short: string;
  type: FieldType;
  unit?: string;
  description: string;
}
export interface LayerDef {
  name: string;
  title: string;
  geometry: 'LineString' | 'Point';
  fields: LayerField[];
}

const f = (name: string, short: string, type: FieldType, description: string, unit?: string): LayerField => ({ name, short, type, description, unit });

export const LAYERS: LayerDef[] = [
  {
    name: 'as_built_sections', title: 'As-built sections', geometry: 'LineString', fields: [
      f('section_id', 'sect_id', 'string', 'lasting section id'),
      f('route', 'route', 'string', 'planned route reference'),
      f('street', 'street', 'string', 'street of the planned route'),
      f('from_chainage_m', 'from_ch_m', 'real', 'start chainage along the planned route', 'm'),
      f('to_chainage_m', 'to_ch_m', 'real', 'end chainage along the planned route', 'm'),
      f('length_m', 'length_m', 'real', 'geodesic length', 'm'),
      f('status', 'status', 'string', 'as_planned, deviates, unplanned or not_built'),
      f('max_offset_m', 'max_off_m', 'real', 'largest offset from the planned route', 'm'),
      f('p95_offset_m', 'p95_off_m', 'real', '95th percentile offset from the planned route', 'm'),
      f('accuracy_m', 'acc95_m', 'real', 'position accuracy, 95 % radius', 'm'),
      f('laid_on', 'laid_on', 'date', 'day laid'),
      f('review', 'review', 'string', 'review: approved, pending, rejected, acknowledged'),
    ],
  },
  {
    name: 'planned_routes', title: 'Planned routes', geometry: 'LineString', fields: [
      f('route', 'route', 'string', 'planned route reference'),
      f('kind', 'kind', 'string', 'street or crossing'),
      f('street', 'street', 'string', 'street name'),
    ],
  },
  {
    name: 'road_crossings', title: 'Road crossings', geometry: 'LineString', fields: [
      f('crossing_id', 'cross_id', 'string', 'record id'),
      f('route', 'route', 'string', 'crossing route reference'),
      f('built', 'built', 'boolean', 'built (true) or not yet'),
      f('built_on', 'built_on', 'date', 'day built'),
      f('length_m', 'length_m', 'real', 'length as built', 'm'),
      f('duct_count', 'duct_cnt', 'integer', 'number of ducts'),
      f('addresses', 'addresses', 'string', 'address keys the crossing serves'),
    ],
  },
  {
    name: 'test_pits', title: 'Test pits', geometry: 'Point', fields: [
      f('pit_id', 'pit_id', 'string', 'record id'),
      f('route', 'route', 'string', 'planned route reference'),
      f('chainage_m', 'chain_m', 'real', 'chainage along the route', 'm'),
      f('name', 'name', 'string', 'pit name'),
      f('dug_on', 'dug_on', 'date', 'day dug'),
      f('method', 'method', 'string', 'hand_dug, vacuum or other'),
      f('depth_m', 'depth_m', 'real', 'depth dug', 'm'),
      f('findings', 'findings', 'string', 'findings'),
    ],
  },
  {
    name: 'utility_crossings', title: 'Utility crossings', geometry: 'Point', fields: [
      f('utility_crossing_id', 'util_id', 'string', 'record id'),
      f('route', 'route', 'string', 'planned route reference'),
      f('chainage_m', 'chain_m', 'real', 'chainage along the route', 'm'),
      f('owner', 'owner', 'string', 'utility owner'),
      f('depth_m', 'depth_m', 'real', 'depth of the utility', 'm'),
      f('clearance_m', 'clear_m', 'real', 'clearance to the duct', 'm'),
      f('method', 'method', 'string', 'gpr, test_pit, records or other'),
      f('found_on', 'found_on', 'date', 'day found'),
    ],
  },
  {
    name: 'depth_readings', title: 'Depth readings', geometry: 'Point', fields: [
      f('reading_id', 'read_id', 'string', 'record id'),
      f('route', 'route', 'string', 'planned route reference'),
      f('chainage_m', 'chain_m', 'real', 'chainage along the route', 'm'),
      f('cover_m', 'cover_m', 'real', 'cover over the duct', 'm'),
      f('trench_depth_m', 'trench_m', 'real', 'trench depth', 'm'),
      f('source', 'source', 'string', 'typed, csv or upload'),
    ],
  },
  {
    name: 'photo_points', title: 'Photo points', geometry: 'Point', fields: [
      f('photo_id', 'photo_id', 'string', 'record id'),
      f('route', 'route', 'string', 'planned route reference'),
      f('chainage_m', 'chain_m', 'real', 'chainage along the route', 'm'),
      f('file_name', 'file_name', 'string', 'file under originals/photos/'),
      f('caption', 'caption', 'string', 'caption'),
      f('placed_by', 'placed_by', 'string', 'exif, hand, chainage, crossing or pit'),
    ],
  },
  {
    name: 'addresses', title: 'Addresses', geometry: 'Point', fields: [
      f('address_key', 'addr_key', 'string', 'address key'),
      f('street', 'street', 'string', 'street'),
      f('number', 'number', 'string', 'house number'),
      f('units', 'units', 'integer', 'households at the address'),
      f('passed', 'passed', 'boolean', 'passed by the built network'),
      f('passed_approved', 'passed_ok', 'boolean', 'passed by approved sections'),
      f('connected', 'connected', 'boolean', 'drop installed'),
    ],
  },
];

/** Checks the short names: at most 10 characters, unique per layer (a shapefile's DBF limit). */
export function shortNameProblems(layers: LayerDef[] = LAYERS): string[] {
  const out: string[] = [];
  for (const l of layers) {
    const seen = new Set<string>();
    for (const fl of l.fields) {
      if (fl.short.length > 10) out.push(`${l.name}.${fl.name}: ${fl.short} is longer than 10 characters`);
      if (seen.has(fl.short.toLowerCase())) out.push(`${l.name}.${fl.name}: ${fl.short} is used twice`);
      seen.add(fl.short.toLowerCase());
    }
  }
  return out;
}

export type Props = Record<string, string | number | boolean | null>;
export interface LayerFeature {
  /** [lon, lat] or [[lon, lat], …] in WGS 84 */
  coordinates: number[] | number[][];
  props: Props;
}
