// shpjs 6 ships no types. Shapes below follow node_modules/shpjs/lib/index.js.
declare module 'shpjs' {
  type Bytes = ArrayBuffer | ArrayBufferView | DataView;
  type Collection = GeoJSON.FeatureCollection & { fileName?: string };

  /** A zip (bytes), a URL, or loose parts { shp, dbf?, cpg?, prj? }; prj reprojects to WGS 84 through proj4. */
  const shp: (
    input: string | Bytes | { shp: Bytes; dbf?: Bytes; cpg?: Bytes | string; prj?: Bytes | string },
    whiteList?: string[],
  ) => Promise<Collection | Collection[]>;
  export default shp;

  /** Geometries of a .shp, one per record, null for null shapes; reprojected only when prj is given. */
  export function parseShp(shp: Bytes, prj?: Bytes | string | false): (GeoJSON.Geometry | null)[];
  /** Records of a .dbf, decoded with the code page named in cpg (UTF-8 … ) or the dbf's own. */
  export function parseDbf(dbf: Bytes, cpg?: Bytes | string): Record<string, string | number | boolean | Date | null>[];
  export function combine(parts: [(GeoJSON.Geometry | null)[], Record<string, unknown>[]?]): GeoJSON.FeatureCollection;
  export function parseZip(buffer: Bytes, whiteList?: string[]): Promise<Collection | Collection[]>;
  export function getShapefile(
    input: string | Bytes | { shp: Bytes; dbf?: Bytes; cpg?: Bytes | string; prj?: Bytes | string },
    whiteList?: string[],
  ): Promise<Collection | Collection[]>;
}
