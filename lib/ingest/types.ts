/** What the upload parsers produce, whatever the format: plain data in WGS 84 (EPSG:4326), lon/lat order. */

export type UploadFormat = 'gpx' | 'kml' | 'kmz' | 'shapefile' | 'geojson' | 'csv';

/** One position: [lon, lat] or [lon, lat, height in metres]. */
export type Position = [number, number] | [number, number, number];

export interface ParsedLine {
  kind: 'line';
  /** name of the track, placemark, feature or CSV line id */
  name: string | null;
  /** ≥ 2 positions in WGS 84 */
  coords: Position[];
  /** per-position ISO 8601 time (UTC) or null, same length as coords, when the format has times */
  times: (string | null)[] | null;
  /** per-position extra values (e.g. hdop, fix, rms_h, point id, code), same length as coords */
  pointAttributes: Record<string, (string | number | null)[]> | null;
  /** feature-level attributes (KML ExtendedData, .dbf fields, GeoJSON properties, CSV code …) */
  attributes: Record<string, unknown>;
}

export interface ParsedPoint {
  kind: 'point';
  name: string | null;
  coord: Position;
  time: string | null;
  attributes: Record<string, unknown>;
}

export type ParsedFeature = ParsedLine | ParsedPoint;

/** Survey CSV column mapping: which header holds which value. */
export interface ColumnMap {
  id?: string;
  x?: string;
  y?: string;
  z?: string;
  lat?: string;
  lon?: string;
  code?: string;
  line?: string;
  date?: string;
  fix?: string;
  rmsH?: string;
  rmsV?: string;
  /** a depth shot's cover (m), kept on each point as `depth` for depth readings taken from the upload */
  depth?: string;
}

export interface ParsedUpload {
  format: UploadFormat;
  /** the coordinate system the file was in, e.g. 'EPSG:4326', 'EPSG:32633' */
  sourceCrs: string;
  features: ParsedFeature[];
  /** non-fatal problems: skipped degenerate parts, guessed columns, approximate datum shifts */
  warnings: string[];
  /** for CSV: the mapping used, and whether it was guessed */
  columns?: { map: ColumnMap; guessed: boolean; headers: string[] };
}

/** A coordinate system from the catalogue (PostGIS spatial_ref_sys), as the parsers need it. */
export interface CrsDefinition {
  srid: number;
  name: string;
  proj4: string;
}

export type CrsResolver = (srid: number) => Promise<CrsDefinition | undefined>;

export interface IngestLimits {
  /** total inflated bytes allowed out of a zip (KMZ, zipped shapefile) */
  maxInflatedBytes: number;
  maxZipEntries: number;
}

export interface ParseOptions {
  /** 'EPSG:xxxx' when the caller names the source CRS (required for shapefiles without .prj, projected CSV) */
  crs?: string;
  columns?: ColumnMap;
  resolveCrs: CrsResolver;
  limits: IngestLimits;
  /** [west, south, east, north] of the project, to say when swapped axes would land inside it */
  projectExtent?: [number, number, number, number] | null;
}

/** Error codes of the ingest pipeline; each maps to one HTTP status in lib/api/errors.ts. */
export type IngestErrorCode =
  | 'empty_file' // 422
  | 'unknown_format' // 415
  | 'unsupported_format' // 415 (DXF, GeoPackage …: say which formats are supported)
  | 'malformed' // 422 (say where: line/column, row numbers, element)
  | 'unsafe_xml' // 422 (DOCTYPE / ENTITY)
  | 'unsafe_zip' // 422 (absolute or .. paths)
  | 'zip_limits' // 413 (inflated size or entry count over the limit, counted while inflating)
  | 'missing_parts' // 422 (shapefile set missing .shp/.shx/.dbf)
  | 'crs_required' // 422 (no or unreadable .prj, projected CSV without crs)
  | 'unknown_crs' // 422 (EPSG code not in the catalogue)
  | 'out_of_range' // 422 (lat beyond ±90, lon beyond ±180)
  | 'swapped_axes' // 422 (lat/lon or easting/northing look swapped)
  | 'too_few_points'; // 422 (nothing usable: every track < 2 points)

export class IngestError extends Error {
  constructor(
    readonly code: IngestErrorCode,
    message: string,
    /** e.g. [{ row: 12, message: 'latitude 95.2 is beyond ±90' }] or { line, column } */
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'IngestError';
  }
}
