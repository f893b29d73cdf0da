import type { AddressValues, Side } from './address-mapping';

/**
 * What an import would do to the register: by key, the addresses it adds, changes (with the fields, before
 * and after), restores (a key an earlier import removed comes back), removes (present before, not in this
 * file; never for a partial import) and leaves unchanged. Pure, so the preview and the import agree.
 *
 * Connected flags: a flag of yes connects an address (source 'import'); a flag of no disconnects only what an
 * import connected: a drop recorded as installed by hand is never undone by an import. A field the file has
 * no column for is left as it is.
 */

/** An address as stored, in the fields an import compares. */
export interface RegisterAddress {
  key: string;
  street: string;
  number: string;
  postcode: string;
  locality: string;
  units: number;
  buildingType: string;
  lon: number;
  lat: number;
  designRouteRef: string | null;
  designSide: Side | null;
  connected: boolean;
  connectedSource: 'hand' | 'import' | null;
  removed: boolean;
}

export type ComparedField = 'street' | 'number' | 'postcode' | 'locality' | 'units' | 'buildingType' | 'position' | 'designRouteRef' | 'designSide' | 'connected';

export interface FieldChanges {
  before: Partial<Record<ComparedField, unknown>>;
  after: Partial<Record<ComparedField, unknown>>;
}

export interface AddressChange extends FieldChanges {
  key: string;
  row: number;
  fields: ComparedField[];
}

export interface RegisterDiff {
  added: AddressValues[];
  changed: (AddressChange & { values: AddressValues })[];
  restored: (AddressChange & { values: AddressValues })[];
  removed: string[];
  unchanged: string[];
}

// a position is the same when it moved less than about a millimetre (1e-8° of latitude is 1.1 mm)
const SAME_DEGREES = 1e-8;

/** The fields of `v` that differ from `a`, before and after; [] when none does. */
export function changedFields(a: RegisterAddress, v: AddressValues): AddressChange {
  const before: FieldChanges['before'] = {};
  const after: FieldChanges['after'] = {};
  const note = (f: ComparedField, was: unknown, now: unknown) => {
    before[f] = was;
    after[f] = now;
  };
  const simple: [ComparedField, keyof AddressValues, keyof RegisterAddress][] = [
    ['street', 'street', 'street'], ['number', 'number', 'number'], ['postcode', 'postcode', 'postcode'], ['locality', 'locality', 'locality'],
    ['units', 'units', 'units'], ['buildingType', 'buildingType', 'buildingType'], ['designRouteRef', 'designRouteRef', 'designRouteRef'], ['designSide', 'designSide', 'designSide'],
  ];
  for (const [f, vk, ak] of simple) if (v[vk] !== undefined && v[vk] !== a[ak]) note(f, a[ak], v[vk]);
  if (Math.abs(v.lon - a.lon) > SAME_DEGREES || Math.abs(v.lat - a.lat) > SAME_DEGREES) note('position', [a.lon, a.lat], [v.lon, v.lat]);
  if (v.connected === true && !a.connected) note('connected', false, true);
  if (v.connected === false && a.connected && a.connectedSource === 'import') note('connected', true, false);
  return { key: v.key, row: v.row, fields: Object.keys(after) as ComparedField[], before, after };
}

/** What importing `values` would do to `register` (every address of the project by key, removed ones too). */
export function diffRegister(register: Map<string, RegisterAddress>, values: AddressValues[], partial: boolean): RegisterDiff {
  const diff: RegisterDiff = { added: [], changed: [], restored: [], removed: [], unchanged: [] };
  const inFile = new Set<string>();
  for (const v of values) {
    inFile.add(v.key);
    const a = register.get(v.key);
    if (!a) {
      diff.added.push(v);
      continue;
    }
    const c = changedFields(a, v);
    if (a.removed) diff.restored.push({ ...c, values: v });
    else if (c.fields.length) diff.changed.push({ ...c, values: v });
    else diff.unchanged.push(v.key);
  }
  if (!partial) {
    for (const a of register.values()) if (!a.removed && !inFile.has(a.key)) diff.removed.push(a.key);
  }
  return diff;
}

export function diffCounts(d: RegisterDiff, rows: number) {
  return { rows, added: d.added.length, changed: d.changed.length, removed: d.removed.length, restored: d.restored.length, unchanged: d.unchanged.length };
}
