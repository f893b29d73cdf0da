import proj4 from 'proj4';
import type { CrsDefinition } from './types';

/** A WKT node: KEYWORD[arg, …]; args are strings, numbers or nodes. */
interface WktNode {
  keyword: string;
  args: (string | number | WktNode)[];
}

/** Parse WKT1 or WKT2 into a tree, or null when it is not WKT. */
export function parseWkt(text: string): WktNode | null {
  const s = text.trim();
  let i = 0;
  const ws = () => {
    while (i < s.length && /\s/.test(s[i])) i++;
  };
  const node = (): WktNode => {
    const m = /^[A-Za-z_][A-Za-z0-9_]*/.exec(s.slice(i));
    if (!m) throw new Error(`keyword expected at ${i}`);
    i += m[0].length;
    ws();
    const args: WktNode['args'] = [];
    if (s[i] !== '[' && s[i] !== '(') return { keyword: m[0].toUpperCase(), args };
    const close = s[i] === '[' ? ']' : ')';
    i++;
    for (;;) {
      ws();
      if (s[i] === '"') {
        let j = i + 1;
        let out = '';
        // WKT escapes a quote by doubling it
        while (j < s.length && !(s[j] === '"' && s[j + 1] !== '"')) {
          if (s[j] === '"') j++;
          out += s[j++];
        }
        args.push(out);
        i = j + 1;
      } else if (/[-+\d.]/.test(s[i] ?? '')) {
        const n = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?/.exec(s.slice(i));
        if (!n) throw new Error(`number expected at ${i}`);
        args.push(Number(n[0]));
        i += n[0].length;
      } else args.push(node());
      ws();
      if (s[i] === ',') i++;
      else if (s[i] === close) {
        i++;
        return { keyword: m[0].toUpperCase(), args };
      } else throw new Error(`',' or '${close}' expected at ${i}`);
    }
  };
  try {
    return node();
  } catch {
    return null;
  }
}

const nameOf = (n: WktNode) => (typeof n.args[0] === 'string' ? n.args[0] : '');
const norm = (name: string) => name.toLowerCase().replace(/[^a-z0-9]+/g, '_').replace(/^_|_$/g, '');

/**
 * ESRI and OGC names that map to one EPSG code without doubt. Anything else needs an
 * AUTHORITY in the WKT or the crs field: a name that merely resembles one is never taken.
 */
const NAMED: Record<string, number> = {
  gcs_wgs_1984: 4326, wgs_84: 4326, wgs84: 4326,
  gcs_etrs_1989: 4258, etrs89: 4258,
  gcs_north_american_1983: 4269, nad83: 4269,
  british_national_grid: 27700, osgb_1936_british_national_grid: 27700, osgb36_british_national_grid: 27700,
  wgs_1984_web_mercator_auxiliary_sphere: 3857, wgs_84_pseudo_mercator: 3857,
  nad_1983_stateplane_new_york_long_island_fips_3104_feet: 2263, nad83_new_york_long_island_ftus: 2263,
  dhdn_3_degree_gauss_zone_2: 31466, dhdn_3_degree_gauss_zone_3: 31467, dhdn_3_degree_gauss_zone_4: 31468, dhdn_3_degree_gauss_zone_5: 31469,
  dhdn_3_degree_gauss_kruger_zone_2: 31466, dhdn_3_degree_gauss_kruger_zone_3: 31467, dhdn_3_degree_gauss_kruger_zone_4: 31468, dhdn_3_degree_gauss_kruger_zone_5: 31469,
  ch1903_lv95: 2056, ch1903_lv03: 21781, rd_new: 28992, amersfoort_rd_new: 28992,
  rgf_1993_lambert_93: 2154, rgf93_lambert_93: 2154, rgf93_v1_lambert_93: 2154,
};

function byPattern(name: string): number | null {
  let m = /^(?:wgs_1984|wgs_84)_utm_zone_(\d{1,2})([ns])$/.exec(name);
  if (m && +m[1] >= 1 && +m[1] <= 60) return (m[2] === 'n' ? 32600 : 32700) + +m[1];
  m = /^(?:etrs_1989|etrs89)_utm_zone_(\d{2})n$/.exec(name);
  if (m && +m[1] >= 28 && +m[1] <= 38) return 25800 + +m[1];
  m = /^(?:nad_1983|nad83)_utm_zone_(\d{1,2})n$/.exec(name);
  if (m && +m[1] >= 1 && +m[1] <= 23) return 26900 + +m[1];
  m = /^(?:gda_1994|gda94)_mga_zone_(\d{2})$/.exec(name);
  if (m && +m[1] >= 46 && +m[1] <= 59) return 28300 + +m[1];
  m = /^(?:gda2020)_mga_zone_(\d{2})$/.exec(name);
  if (m && +m[1] >= 46 && +m[1] <= 59) return 7800 + +m[1];
  return null;
}

/**
 * The EPSG code a .prj names: the root AUTHORITY/ID["EPSG", n] when present, else an exact
 * name from a short table of unambiguous ESRI/OGC names (UTM zones and a few national grids).
 * Returns null when the .prj cannot be identified.
 *
 * @example
 * prjToEpsg('PROJCS["WGS_1984_UTM_Zone_33N",GEOGCS[…],PROJECTION["Transverse_Mercator"],…]'); // 32633
 * prjToEpsg('PROJCS["ETRS89 / UTM zone 32N",…,AUTHORITY["EPSG","25832"]]'); // 25832
 */
export function prjToEpsg(wkt: string): number | null {
  const root = parseWkt(wkt);
  if (!root) return null;
  for (const a of root.args) {
    if (typeof a === 'object' && (a.keyword === 'AUTHORITY' || a.keyword === 'ID') && String(a.args[0]).toUpperCase() === 'EPSG') {
      const code = Number(a.args[1]);
      if (Number.isInteger(code) && code > 0) return code;
    }
  }
  const name = norm(nameOf(root));
  return NAMED[name] ?? byPattern(name);
}

type ProjLike = Record<string, number | string | undefined>;

function family(projName: unknown): string | null {
  const n = norm(String(projName ?? ''));
  if (['utm', 'tmerc', 'etmerc', 'transverse_mercator', 'gauss_kruger'].includes(n)) return 'tmerc';
  if (n === 'lcc' || n.startsWith('lambert_conformal_conic')) return 'lcc';
  if (n === 'longlat' || n === 'latlong') return 'longlat';
  if (n === 'merc' || n.startsWith('mercator')) return 'merc';
  if (n === 'somerc' || n.startsWith('hotine_oblique_mercator') || n.startsWith('swiss')) return 'somerc';
  if (n === 'sterea' || n.startsWith('double_stereographic') || n.startsWith('oblique_stereographic')) return 'sterea';
  return null;
}

/**
 * Cross-check a .prj against the catalogue definition of the code it was mapped to: the
 * projection's defining parameters must agree. Returns why they differ, or null when they agree
 * (or when proj4 cannot read the .prj, in which case the mapping stands on the name alone).
 *
 * @example
 * prjMismatch(prjText, { srid: 32633, name: 'WGS 84 / UTM zone 33N', proj4: '+proj=utm +zone=33 +datum=WGS84' }); // null
 */
export function prjMismatch(wkt: string, def: CrsDefinition): string | null {
  let a: ProjLike;
  let b: ProjLike;
  try {
    a = proj4.Proj(wkt) as unknown as ProjLike;
    b = proj4.Proj(def.proj4) as unknown as ProjLike;
  } catch {
    return null;
  }
  const fa = family(a.projName);
  const fb = family(b.projName);
  if (fa && fb && fa !== fb) return `projection ${a.projName} differs from ${b.projName}`;
  if (fa === 'longlat' && fb === 'longlat') return Math.abs(Number(a.a) - Number(b.a)) > 0.01 ? 'ellipsoid differs' : null;
  const checks: [string, number][] = [['long0', 1e-9], ['lat0', 1e-9], ['lat1', 1e-9], ['lat2', 1e-9], ['x0', 0.01], ['y0', 0.01], ['k0', 1e-9], ['a', 0.01], ['es', 1e-9]];
  for (const [k, tol] of checks) {
    const va = a[k];
    const vb = b[k];
    if (typeof va !== 'number' || typeof vb !== 'number') continue;
    if (Math.abs(va - vb) > tol) return `${k} is ${va} in the .prj but ${vb} in the catalogue`;
  }
  const ua = typeof a.to_meter === 'number' ? a.to_meter : 1;
  const ub = typeof b.to_meter === 'number' ? b.to_meter : 1;
  if (Math.abs(ua / ub - 1) > 1e-9) return `the unit is ${ua} m in the .prj but ${ub} m in the catalogue`;
  return null;
}
