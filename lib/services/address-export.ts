import { stringify } from 'csv-stringify/sync';
import ExcelJS from 'exceljs';
import type { Writable } from 'node:stream';
import type { Address } from '@/db/addresses';

/**
 * The address register as the households page and the API hand it out: JSON, an RFC 7946 GeoJSON
 * FeatureCollection, CSV and an Excel workbook, all with the same columns.
 */

export type AddressFormat = 'json' | 'geojson' | 'csv' | 'xlsx';

/** 7 decimals of a degree is about 1 cm: more than any address point carries (RFC 7946 §11.2 advises restraint). */
const round7 = (x: number) => Math.round(x * 1e7) / 1e7;

/** The properties every export carries, in this order (the CSV's header, the GeoJSON's properties). */
export const ADDRESS_PROPERTIES = ['street', 'number', 'postcode', 'units', 'passed', 'passedApproved', 'connected', 'servingRouteRef', 'side', 'notPassedReason'] as const;

const props = (a: Address) => ({
  street: a.street, number: a.number, postcode: a.postcode, units: a.units, passed: a.passed, passedApproved: a.passedApproved,
  connected: a.connected, servingRouteRef: a.servingRouteRef, side: a.side, notPassedReason: a.notPassedReason,
});

/**
 * The addresses as an RFC 7946 FeatureCollection: WGS 84 by definition (no "crs" member), positions
 * rounded to 7 decimals, the collection's bbox [west, south, east, north]; each feature's id is the
 * address key. `addressesGeoJson([a])` → `{ type: 'FeatureCollection', bbox: [...], features: [{ id: a.key, ... }] }`.
 */
export function addressesGeoJson(addresses: Address[]) {
  const features = addresses.map((a) => ({
    type: 'Feature' as const,
    id: a.key,
    geometry: { type: 'Point' as const, coordinates: [round7(a.lon), round7(a.lat)] },
    properties: props(a),
  }));
  if (features.length === 0) return { type: 'FeatureCollection' as const, features };
  // a loop, not Math.min(...xs): a spread of a large register overflows the call stack
  const bbox: [number, number, number, number] = [Infinity, Infinity, -Infinity, -Infinity];
  for (const f of features) {
    const [x, y] = f.geometry.coordinates;
    bbox[0] = Math.min(bbox[0], x); bbox[1] = Math.min(bbox[1], y); bbox[2] = Math.max(bbox[2], x); bbox[3] = Math.max(bbox[3], y);
  }
  return { type: 'FeatureCollection' as const, bbox, features };
}

/** The addresses as CSV (RFC 4180, UTF-8): key, the properties, then lon and lat in WGS 84 degrees; an empty cell for no value. */
export function addressesCsv(addresses: Address[]): string {
  const header = ['key', ...ADDRESS_PROPERTIES, 'lon', 'lat'];
  const rows = addresses.map((a) => {
    const p = props(a);
    return [a.key, ...ADDRESS_PROPERTIES.map((k) => (p[k] === null ? '' : String(p[k]))), String(round7(a.lon)), String(round7(a.lat))];
  });
  return stringify([header, ...rows]);
}

/** What the summary sheet and the page's tiles count. */
export function addressCounts(addresses: Address[]) {
  const sum = (f: (a: Address) => boolean) => addresses.filter(f).reduce((s, a) => s + a.units, 0);
  return {
    addresses: addresses.length,
    households: sum(() => true),
    householdsServed: sum((a) => a.servingRouteId !== null),
    addressesPassed: addresses.filter((a) => a.passed).length,
    householdsPassed: sum((a) => a.passed),
    addressesPassedApproved: addresses.filter((a) => a.passedApproved).length,
    householdsPassedApproved: sum((a) => a.passedApproved),
    addressesConnected: addresses.filter((a) => a.connected).length,
    householdsConnected: sum((a) => a.connected),
  };
}

const yesNo = (b: boolean) => (b ? 'yes' : 'no');
const SIDE_WORDS = { route: 'route side', across: 'across the street' } as const;

interface Col { header: string; width: number; numFmt?: string; value: (a: Address) => string | number | Date | null }
const COLUMNS: Col[] = [
  { header: 'Key', width: 16, value: (a) => a.key },
  { header: 'Street', width: 24, value: (a) => a.street },
  { header: 'Number', width: 9, value: (a) => a.number },
  { header: 'Postcode', width: 11, value: (a) => a.postcode },
  { header: 'Households (units)', width: 12, numFmt: '0', value: (a) => a.units },
  { header: 'Passed', width: 9, value: (a) => yesNo(a.passed) },
  { header: 'Passed and approved', width: 12, value: (a) => yesNo(a.passedApproved) },
  { header: 'Connected', width: 11, value: (a) => yesNo(a.connected) },
  { header: 'Connected on', width: 12, numFmt: 'yyyy-mm-dd', value: (a) => (a.connectedOn ? new Date(`${a.connectedOn}T00:00:00Z`) : null) },
  { header: 'Serving route', width: 12, value: (a) => a.servingRouteRef },
  { header: 'Side', width: 16, value: (a) => (a.side ? SIDE_WORDS[a.side] : null) },
  { header: 'Why not passed', width: 40, value: (a) => a.notPassedReason },
  { header: 'Longitude (° WGS 84)', width: 14, numFmt: '0.0000000', value: (a) => round7(a.lon) },
  { header: 'Latitude (° WGS 84)', width: 14, numFmt: '0.0000000', value: (a) => round7(a.lat) },
];

/**
 * Writes the addresses as an Office Open XML workbook with exceljs's streaming writer: the sheet
 * "Addresses" (frozen header row, an autofilter over every column, units in the headers, yes/no for the
 * flags, the connection date as a date) and "Summary" (the counts), e.g.
 * `await writeAddressesWorkbook(addresses, 'Quillhaven North', res)`.
 */
export async function writeAddressesWorkbook(addresses: Address[], projectName: string, out: Writable): Promise<void> {
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useStyles: true });
  const last = String.fromCharCode(64 + COLUMNS.length);
  const ws = wb.addWorksheet('Addresses', { views: [{ state: 'frozen', ySplit: 1 }] });
  ws.autoFilter = `A1:${last}${Math.max(1, addresses.length + 1)}`;
  ws.columns = COLUMNS.map((c, i) => ({ header: c.header, key: String(i), width: c.width, style: c.numFmt ? { numFmt: c.numFmt } : {} }));
  ws.getRow(1).font = { bold: true };
  for (const a of addresses) {
    ws.addRow(Object.fromEntries(COLUMNS.map((c, i) => [String(i), c.value(a)]))).commit();
  }
  ws.commit();
  const c = addressCounts(addresses);
  const summary = wb.addWorksheet('Summary');
  summary.columns = [{ header: 'Figure', key: 'k', width: 44 }, { header: 'Count', key: 'v', width: 12 }];
  summary.getRow(1).font = { bold: true };
  const lines: [string, number | string][] = [
    ['Project', projectName],
    ['Addresses', c.addresses],
    ['Households (units)', c.households],
    ['Households with a serving route', c.householdsServed],
    ['Addresses passed', c.addressesPassed],
    ['Households passed', c.householdsPassed],
    ['Households passed and approved', c.householdsPassedApproved],
    ['Addresses connected', c.addressesConnected],
    ['Households connected', c.householdsConnected],
  ];
  for (const [k, v] of lines) summary.addRow({ k, v }).commit();
  summary.commit();
  await wb.commit();
}
