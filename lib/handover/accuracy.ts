import { ACCURACY_CLASS_LABELS, type AccuracyClass } from '@/lib/records/accuracy-classes';

/**
 * The package's positional accuracy statement: how many metres of packaged section are known to within which
 * 95 % horizontal radius, overall (bands) and by source class (the accuracy class of the uploads a section was
 * derived from). A section built from uploads of more than one class is counted under their combination
 * ("RTK GNSS + Handheld GNSS"), never under the better class alone. Pure: handover-build.ts feeds it.
 *
 * `accuracyStatement([{ lengthM: 10, radius95M: 0.05, classes: ['rtk_gnss'] }])` →
 * `{ bands: [{ radius95: '≤ 0.1 m', metres: 10 }, …], bySource: [{ source: 'RTK GNSS', metres: 10, radius95: { min: 0.05, max: 0.05, lengthWeightedMean: 0.05 }, … }] }`
 */
export interface AccuracyInput {
  lengthM: number;
  /** the section's stated 95 % radius (m); null where nothing measured it */
  radius95M: number | null;
  classes: AccuracyClass[];
}

export const RADIUS_BANDS: readonly (readonly [string, number])[] = [['≤ 0.1 m', 0.1], ['≤ 0.5 m', 0.5], ['≤ 1 m', 1], ['≤ 5 m', 5], ['> 5 m', Infinity]];
const UNKNOWN_BAND = 'unknown (not measured)';

const r3 = (x: number) => Math.round(x * 1000) / 1000;

function bandsOf(rows: AccuracyInput[]): { radius95: string; metres: number }[] {
  const out = RADIUS_BANDS.map(([label, lim], k) => ({
    radius95: label,
    metres: r3(rows.filter((s) => s.radius95M !== null && s.radius95M <= lim && (k === 0 || s.radius95M > RADIUS_BANDS[k - 1][1])).reduce((a, s) => a + s.lengthM, 0)),
  }));
  out.push({ radius95: UNKNOWN_BAND, metres: r3(rows.filter((s) => s.radius95M === null).reduce((a, s) => a + s.lengthM, 0)) });
  return out;
}

/** The source label of a section: its classes in the catalogue's order, joined; "no upload" when none. */
export function sourceLabel(classes: AccuracyClass[]): string {
  const order = Object.keys(ACCURACY_CLASS_LABELS) as AccuracyClass[];
  const uniq = [...new Set(classes)].sort((a, b) => order.indexOf(a) - order.indexOf(b));
  return uniq.length ? uniq.map((c) => ACCURACY_CLASS_LABELS[c]).join(' + ') : 'No source upload';
}

export function accuracyStatement(rows: AccuracyInput[]) {
  const groups = new Map<string, AccuracyInput[]>();
  for (const s of rows) {
    const k = sourceLabel(s.classes);
    groups.set(k, [...(groups.get(k) ?? []), s]);
  }
  const bySource = [...groups.entries()]
    .map(([source, g]) => {
      const known = g.filter((s) => s.radius95M !== null);
      const knownM = known.reduce((a, s) => a + s.lengthM, 0);
      return {
        source,
        metres: r3(g.reduce((a, s) => a + s.lengthM, 0)),
        sections: g.length,
        radius95: known.length
          ? { min: r3(Math.min(...known.map((s) => s.radius95M!))), max: r3(Math.max(...known.map((s) => s.radius95M!))), lengthWeightedMean: r3(knownM > 0 ? known.reduce((a, s) => a + s.lengthM * s.radius95M!, 0) / knownM : 0) }
          : null,
        bands: bandsOf(g).filter((b) => b.metres > 0),
      };
    })
    .sort((a, b) => b.metres - a.metres || a.source.localeCompare(b.source));
  return {
    statement: 'Metres of packaged section known to within each 95 % horizontal radius (each section\'s stated radius), overall and by the accuracy class of the uploads it was derived from.',
    bands: bandsOf(rows),
    bySource,
  };
}
