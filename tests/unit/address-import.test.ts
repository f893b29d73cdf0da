import { describe, expect, it } from 'vitest';
import proj4 from 'proj4';
import { diffRegister, type RegisterAddress } from '@/lib/households/address-diff';
import {
  applyAddressMapping,
  guessAddressMapping,
  mappingProblems,
  parseConnected,
  parseSide,
  parseUnits,
  type Positioner,
  type SourceRow,
} from '@/lib/households/address-mapping';

const wgs84: Positioner = { source: 'lonlat', crsLabel: 'EPSG:4326 (WGS 84)', axes: ['longitude', 'latitude'], toWgs84: (a, b) => [a, b], inArea: () => true };

// British National Grid as PostGIS's catalogue defines it (the +towgs84 7-parameter shift) [published: EPSG:27700]
const BNG = '+proj=tmerc +lat_0=49 +lon_0=-2 +k=0.9996012717 +x_0=400000 +y_0=-100000 +ellps=airy +towgs84=446.448,-125.157,542.06,0.15,0.247,0.842,-20.489 +units=m +no_defs';
const toBng = proj4('+proj=longlat +datum=WGS84 +no_defs', BNG);
const fromBng = proj4(BNG, '+proj=longlat +datum=WGS84 +no_defs');
const bng: Positioner = {
  source: 'xy',
  crsLabel: 'EPSG:27700 (OSGB 1936 / British National Grid)',
  axes: ['easting', 'northing'],
  toWgs84: (x, y) => fromBng.forward([x, y]) as [number, number],
  // the round trip of the reader's area test, simplified: within 15° of the central meridian
  inArea: (_x, _y, ll) => Math.abs(ll[0] + 2) <= 15,
};

const rows = (list: Record<string, string>[], first = 2): SourceRow[] => list.map((values, i) => ({ row: first + i, values }));

describe('guessing the address mapping', () => {
  it('maps the usual names and says which fields it guessed', () => {
    const g = guessAddressMapping(['UPRN', 'Street Name', 'House No', 'Post-Code', 'Town', 'Households', 'Lon', 'Lat', 'Route', 'Route Side', 'Connected', 'Remarks'], {}, false);
    expect(g.mapping).toEqual({ key: 'UPRN', street: 'Street Name', number: 'House No', postcode: 'Post-Code', locality: 'Town', units: 'Households', lon: 'Lon', lat: 'Lat', route: 'Route', side: 'Route Side', connected: 'Connected' });
    expect(g.guessed.sort()).toEqual(['connected', 'key', 'lat', 'locality', 'lon', 'number', 'postcode', 'route', 'side', 'street', 'units']);
  });

  it('keeps what the person gave, unreported, and guesses no position columns for a file with points', () => {
    const g = guessAddressMapping(['id', 'addr_id', 'street', 'x', 'y'], { key: 'addr_id' }, true);
    expect(g.mapping).toEqual({ key: 'addr_id', street: 'street' });
    expect(g.guessed).toEqual(['street']);
    expect(guessAddressMapping(['Easting', 'Northing', 'ID'], {}, false).mapping).toEqual({ key: 'ID', x: 'Easting', y: 'Northing' });
  });

  it('names what is wrong with a mapping: a column not in the file, no key, half a pair, no position', () => {
    expect(mappingProblems({ key: 'id', lon: 'lon', lat: 'lat' }, ['id', 'lon', 'lat'], false)).toEqual([]);
    const p = mappingProblems({ street: 'Strasse', lon: 'lon' }, ['id', 'lon', 'lat'], false).map((x) => x.path);
    expect(p).toEqual(['mapping.street', 'mapping.key', 'mapping.lat', 'mapping.lon']);
    expect(mappingProblems({ key: 'id' }, ['id'], true)).toEqual([]);
  });
});

describe('reading the values', () => {
  it('units: empty is 1, whole numbers from 1, nothing else', () => {
    expect([parseUnits(''), parseUnits('4'), parseUnits('12.0'), parseUnits(3)]).toEqual([1, 4, 12, 3]);
    expect(parseUnits('2.5')).toBe("units '2.5' is not a whole number of 1 or more");
    expect(parseUnits('0')).toMatch(/not a whole number of 1 or more/);
    expect(parseUnits('-3')).toMatch(/not a whole number/);
    expect(parseUnits('many')).toMatch(/not a whole number/);
    expect(parseUnits('20000')).toBe('units 20000 is more than 10000');
  });

  it('side: the route\'s side or across, in several spellings, case-insensitive', () => {
    expect(['route', 'Route_Side', 'SAME', 'near', 'same side'].map(parseSide)).toEqual(['route', 'route', 'route', 'route', 'route']);
    expect(['across', 'Opposite', 'opposite_side', 'FAR', 'far-side'].map(parseSide)).toEqual(['across', 'across', 'across', 'across', 'across']);
    expect(parseSide('')).toBeNull();
    expect(parseSide('left')).toBeUndefined();
  });

  it('connected: yes/no, true/false, 1/0, y/n, x, empty', () => {
    expect(['yes', 'TRUE', '1', 'Y', 'x'].map(parseConnected)).toEqual([true, true, true, true, true]);
    expect(['no', 'False', '0', 'n', ''].map(parseConnected)).toEqual([false, false, false, false, false]);
    expect(parseConnected('maybe')).toBeUndefined();
  });
});

describe('applying the mapping to rows', () => {
  const mapping = { key: 'id', street: 'street', number: 'no', units: 'units', lon: 'lon', lat: 'lat', side: 'side', connected: 'conn', route: 'route' };

  it('turns good rows into values, with the optional fields only when mapped', () => {
    const r = applyAddressMapping(rows([{ id: 'A1', street: 'Cobbler Walk', no: '12a', units: '', lon: '-1.50', lat: '52,10', side: 'Opposite', conn: 'y', route: 'QN-102' }]), mapping, wgs84);
    expect(r.errors).toEqual([]);
    expect(r.values).toEqual([{ row: 2, key: 'A1', lon: -1.5, lat: 52.1, street: 'Cobbler Walk', number: '12a', units: 1, designRouteRef: 'QN-102', designSide: 'across', connected: true }]);
    const bare = applyAddressMapping(rows([{ id: 'A1', lon: '1', lat: '2' }]), { key: 'id', lon: 'lon', lat: 'lat' }, wgs84);
    expect(bare.values).toEqual([{ row: 2, key: 'A1', lon: 1, lat: 2 }]);
  });

  it('reports every bad row with its number and each reason', () => {
    const good = { street: 'Cobbler Walk', no: '1', units: '1', side: '', conn: '', route: '' };
    const r = applyAddressMapping(
      rows([
        { ...good, id: 'A1', lon: '-1.5', lat: '52.1' },
        { ...good, id: '', lon: '-1.5', lat: '52.1' },
        { ...good, id: 'A1', lon: '-1.5', lat: '52.1' },
        { ...good, id: 'A3', lon: '', lat: 'north' },
        { ...good, id: 'A4', lon: '-1.5', lat: '95' },
        { ...good, id: 'A5', lon: '-1.5', lat: '52.1', units: '2.5' },
        { ...good, id: 'A6', lon: '-1.5', lat: '52.1', side: 'left' },
        { ...good, id: 'A7', lon: '-1.5', lat: '52.1', conn: 'maybe' },
        { ...good, id: 'A8', lon: '-1.5', lat: '52.1', units: '0', side: 'behind' },
      ]),
      mapping,
      wgs84,
    );
    expect(r.values.map((v) => v.key)).toEqual(['A1']);
    expect(r.errors).toEqual([
      { row: 3, message: "no key (column 'id' is empty)" },
      { row: 4, key: 'A1', message: "key 'A1' is also on row 2: a key may appear once in the file" },
      { row: 5, key: 'A3', message: "longitude ('lon') is empty; latitude 'north' is not a number" },
      { row: 6, key: 'A4', message: 'latitude 95 is beyond ±90' },
      { row: 7, key: 'A5', message: "units '2.5' is not a whole number of 1 or more" },
      { row: 8, key: 'A6', message: expect.stringMatching(/^side 'left' is not recognised; accepted: route, route_side, same.* across, opposite/) },
      { row: 9, key: 'A7', message: expect.stringMatching(/^connected 'maybe' is not recognised; accepted: yes, no, true, false, 1, 0, y, n, x/) },
      { row: 10, key: 'A8', message: expect.stringMatching(/^units '0' is not a whole number of 1 or more; side 'behind' is not recognised/) },
    ]);
  });

  it('reprojects eastings and northings and refuses those outside the coordinate system\'s area', () => {
    // the expected position is proj4's inverse of a grid position computed forward from it [computed with proj4]
    const [x, y] = toBng.forward([-1.2577, 51.752]);
    const r = applyAddressMapping(rows([{ id: 'B1', e: String(x), n: String(y) }, { id: 'B2', e: '400000', n: '-99999999' }]), { key: 'id', x: 'e', y: 'n' }, bng);
    expect(r.values[0].lon).toBeCloseTo(-1.2577, 7);
    expect(r.values[0].lat).toBeCloseTo(51.752, 7);
    expect(r.errors).toEqual([{ row: 3, key: 'B2', message: 'easting 400000, northing -99999999 lies outside the area of EPSG:27700 (OSGB 1936 / British National Grid)' }]);
  });

  it('reads a feature\'s point, and says when a feature is no point', () => {
    const geo: Positioner = { ...wgs84, source: 'geometry' };
    const r = applyAddressMapping(
      [
        { row: 1, values: { id: 'G1' }, point: [-1.5, 52.1] },
        { row: 2, values: { id: 'G2' }, point: null, geometryType: 'LineString' },
        { row: 3, values: { id: 'G3' }, point: null },
        { row: 4, values: { id: 'G4' }, point: [200, 52.1] },
      ],
      { key: 'id' },
      geo,
    );
    expect(r.values.map((v) => [v.row, v.key, v.lon, v.lat])).toEqual([[1, 'G1', -1.5, 52.1]]);
    expect(r.errors.map((e) => [e.row, e.message])).toEqual([
      [2, 'the feature is a LineString, not a point'],
      [3, 'the feature is without a geometry, not a point'],
      [4, 'longitude 200 is beyond ±180'],
    ]);
  });

  it('carries a row that cannot be read at all (cells not matching the header)', () => {
    const r = applyAddressMapping([{ row: 7, values: { id: 'C1', lon: '1', lat: '2' }, problem: 'the row has 4 cells, the header has 3' }], { key: 'id', lon: 'lon', lat: 'lat' }, wgs84);
    expect(r.errors).toEqual([{ row: 7, key: 'C1', message: 'the row has 4 cells, the header has 3' }]);
  });
});

describe('what an import does to the register', () => {
  const stored = (key: string, over: Partial<RegisterAddress> = {}): RegisterAddress => ({
    key, street: 'Cobbler Walk', number: '1', postcode: '', locality: 'Quillhaven', units: 1, buildingType: '', lon: -1.5, lat: 52.1,
    designRouteRef: null, designSide: null, connected: false, connectedSource: null, removed: false, ...over,
  });
  const reg = (...a: RegisterAddress[]) => new Map(a.map((x) => [x.key, x]));

  it('adds, changes (with the fields), removes, restores and leaves unchanged, by key', () => {
    const d = diffRegister(
      reg(stored('A'), stored('B'), stored('C'), stored('D', { removed: true })),
      [
        { row: 2, key: 'A', lon: -1.5, lat: 52.1, street: 'Cobbler Walk', number: '1' },
        { row: 3, key: 'B', lon: -1.5001, lat: 52.1, street: 'Cobbler Walk', number: '1', units: 3 },
        { row: 4, key: 'D', lon: -1.5, lat: 52.1 },
        { row: 5, key: 'E', lon: -1.5, lat: 52.1 },
      ],
      false,
    );
    expect(d.unchanged).toEqual(['A']);
    expect(d.changed.map((c) => [c.key, c.fields, c.before, c.after])).toEqual([['B', ['units', 'position'], { units: 1, position: [-1.5, 52.1] }, { units: 3, position: [-1.5001, 52.1] }]]);
    expect(d.removed).toEqual(['C']);
    expect(d.restored.map((c) => [c.key, c.fields])).toEqual([['D', []]]);
    expect(d.added.map((v) => v.key)).toEqual(['E']);
    expect(diffRegister(reg(stored('A'), stored('C')), [{ row: 2, key: 'A', lon: -1.5, lat: 52.1 }], true).removed).toEqual([]);
  });

  it('connects from the file, but never undoes a drop recorded by hand', () => {
    const v = (key: string, connected: boolean) => ({ row: 2, key, lon: -1.5, lat: 52.1, connected });
    const d = diffRegister(
      reg(stored('H', { connected: true, connectedSource: 'hand' }), stored('I', { connected: true, connectedSource: 'import' }), stored('N')),
      [v('H', false), v('I', false), v('N', true)],
      false,
    );
    expect(d.unchanged).toEqual(['H']);
    expect(d.changed.map((c) => [c.key, c.after])).toEqual([['I', { connected: false }], ['N', { connected: true }]]);
  });
});
