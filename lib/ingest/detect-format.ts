import { assertSafeXml } from './check-xml';
import { decodeText } from './decode-text';
import { guessDelimiter } from './guess-delimiter';
import { listZipNames } from './read-zip';
import { IngestError } from './types';

/** An uploaded file as the route hands it over. */
export interface UploadFile {
  name: string;
  bytes: Buffer;
}

export type Detected =
  | { format: 'gpx' | 'kml' | 'geojson' | 'csv'; container: 'text'; file: UploadFile; text: string }
  | { format: 'kmz' | 'shapefile'; container: 'zip'; file: UploadFile }
  | { format: 'shapefile'; container: 'loose'; files: UploadFile[] };

export const SUPPORTED_FORMATS = 'GPX, KML/KMZ, zipped or loose ESRI shapefile, GeoJSON, survey CSV';

const SHP_PART = /\.(shp|shx|dbf|prj|cpg)$/i;
const GEOJSON_TYPE = /"type"\s*:\s*"(FeatureCollection|Feature|Point|MultiPoint|LineString|MultiLineString|Polygon|MultiPolygon|GeometryCollection)"/;
// a root element after optional XML declaration, processing instructions and comments
const XML_ROOT = /^(?:\s|<\?[\s\S]*?\?>|<!--[\s\S]*?-->)*<(?:[A-Za-z_][\w.-]*:)?([A-Za-z_][\w.-]*)/;

function startsWith(bytes: Buffer, magic: number[]): boolean {
  return bytes.length >= magic.length && magic.every((b, i) => bytes[i] === b);
}

/** .shp and .shx both open with file code 9994, big-endian. */
function isShapeMagic(bytes: Buffer): boolean {
  return bytes.length >= 100 && bytes.readInt32BE(0) === 9994;
}

function unknown(name: string, why: string): IngestError {
  return new IngestError('unknown_format', `'${name}' ${why}; supported formats: ${SUPPORTED_FORMATS}`);
}

function detectZip(file: UploadFile): Detected {
  const names = listZipNames(file.bytes);
  if (!names) throw new IngestError('malformed', `'${file.name}' starts like a zip archive but its central directory cannot be read`);
  const files = names.filter((n) => !n.endsWith('/') && !n.startsWith('__MACOSX/'));
  if (files.some((n) => /\.kml$/i.test(n))) return { format: 'kmz', container: 'zip', file };
  if (files.some((n) => /\.(shp|shx|dbf)$/i.test(n))) return { format: 'shapefile', container: 'zip', file };
  const sample = files.slice(0, 5).join(', ') || 'nothing';
  throw unknown(file.name, `is a zip archive holding neither a .kml nor a shapefile (it holds ${sample})`);
}

function detectText(file: UploadFile, text: string): Detected {
  const head = text.slice(0, 4096);
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u0008\u000e-\u001a\u001c-\u001f]/.test(head)) throw unknown(file.name, 'is a binary file of an unknown kind');
  const start = text.trimStart();
  if (/^0[ \t]*\r?\n[ \t]*SECTION/.test(start)) {
    throw new IngestError('unsupported_format', `'${file.name}' is a DXF drawing, which is not supported; export the lines from the CAD program as one of: ${SUPPORTED_FORMATS}`);
  }
  if (start.startsWith('<')) {
    assertSafeXml(text);
    const root = XML_ROOT.exec(start)?.[1];
    if (root === 'gpx') return { format: 'gpx', container: 'text', file, text };
    if (root === 'kml') return { format: 'kml', container: 'text', file, text };
    throw unknown(file.name, `is XML with root element <${root ?? '?'}>, neither GPX nor KML`);
  }
  if (start.startsWith('{') || start.startsWith('[')) {
    if (GEOJSON_TYPE.test(text)) return { format: 'geojson', container: 'text', file, text };
    throw unknown(file.name, 'is JSON without a GeoJSON "type" (FeatureCollection, Feature or a geometry)');
  }
  const lines = start.split(/\r?\n/).filter((l) => l.trim() !== '');
  if (lines.length >= 2) {
    const delimiter = guessDelimiter(lines[0]);
    if (delimiter) return { format: 'csv', container: 'text', file, text };
  }
  throw unknown(file.name, 'is not in a recognised format');
}

function detectOne(file: UploadFile): Detected {
  const { bytes } = file;
  if (bytes.length === 0) throw new IngestError('empty_file', `'${file.name}' is empty (0 bytes)`);
  if (startsWith(bytes, [0x50, 0x4b, 0x03, 0x04]) || startsWith(bytes, [0x50, 0x4b, 0x05, 0x06])) return detectZip(file);
  if (bytes.subarray(0, 16).toString('latin1') === 'SQLite format 3\0') {
    throw new IngestError('unsupported_format', `'${file.name}' is a GeoPackage/SQLite database, which is not supported; export the layer as one of: ${SUPPORTED_FORMATS}`);
  }
  if (isShapeMagic(bytes)) return { format: 'shapefile', container: 'loose', files: [file] };
  const text = decodeText(bytes);
  if (text.trim() === '') throw new IngestError('empty_file', `'${file.name}' contains only whitespace`);
  return detectText(file, text);
}

/**
 * Decide the format of an upload from its content; names are used only to pair the parts of one
 * shapefile.
 *
 * @example
 * detectFormat([{ name: 'walk.xml', bytes: gpxBytes }]); // { format: 'gpx', container: 'text', … }
 * detectFormat([shp, shx, dbf, prj]); // { format: 'shapefile', container: 'loose', files: [...] }
 */
export function detectFormat(files: UploadFile[]): Detected {
  if (files.length === 0) throw new IngestError('empty_file', 'no file was sent');
  if (files.length === 1) return detectOne(files[0]);
  const looksLikeShapefile =
    files.some((f) => isShapeMagic(f.bytes)) || files.every((f) => SHP_PART.test(f.name));
  if (looksLikeShapefile) return { format: 'shapefile', container: 'loose', files };
  throw unknown(
    files.map((f) => f.name).join("', '"),
    'were sent together, but only the parts of a shapefile (.shp, .shx, .dbf, .prj, .cpg) may be sent as several files',
  );
}
