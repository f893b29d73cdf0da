import { IngestError, type CrsDefinition, type CrsResolver } from './types';

const CODE = /^(?:EPSG:{1,2}|urn:ogc:def:crs:EPSG:[\d.]*:|https?:\/\/www\.opengis\.net\/def\/crs\/EPSG\/\d+\/)?(\d{4,6})$/i;
const CRS84 = /^(?:urn:ogc:def:crs:OGC:1\.3:CRS84|OGC:CRS84|CRS:84|https?:\/\/www\.opengis\.net\/def\/crs\/OGC\/1\.3\/CRS84)$/i;

/**
 * The EPSG code in a CRS name as users and files write it, or null.
 *
 * @example
 * epsgCode('EPSG:25832'); // 25832
 * epsgCode('urn:ogc:def:crs:EPSG::25832'); // 25832
 * epsgCode('urn:ogc:def:crs:OGC:1.3:CRS84'); // 4326
 */
export function epsgCode(text: string): number | null {
  const t = text.trim();
  if (CRS84.test(t)) return 4326;
  const m = CODE.exec(t);
  return m ? Number(m[1]) : null;
}

/**
 * Look an EPSG code up in the catalogue; 'unknown_crs' when it is not there.
 *
 * @example
 * const def = await resolveCode(32633, opts.resolveCrs);
 */
export async function resolveCode(srid: number, resolveCrs: CrsResolver): Promise<CrsDefinition> {
  const def = await resolveCrs(srid);
  if (!def || !def.proj4?.trim()) {
    throw new IngestError('unknown_crs', `EPSG:${srid} is not in the coordinate system catalogue${def ? ' with a usable definition' : ''}; check the code`, { srid });
  }
  return def;
}

/**
 * Resolve a CRS as named in the request's crs field ('EPSG:25832', '25832', an OGC URN).
 *
 * @example
 * await resolveCrsName('EPSG:25832', opts.resolveCrs); // { srid: 25832, name: 'ETRS89 / UTM zone 32N', proj4: '…' }
 */
export async function resolveCrsName(name: string, resolveCrs: CrsResolver): Promise<CrsDefinition> {
  const code = epsgCode(name);
  if (code === null) throw new IngestError('unknown_crs', `'${name}' is not an EPSG code; write it as EPSG:nnnn`, { crs: name });
  return resolveCode(code, resolveCrs);
}
