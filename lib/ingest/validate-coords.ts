import { IngestError, type ParsedFeature, type Position } from './types';

export interface RangeProblem {
  /** where: feature index and name, position index, or a file position */
  where: string;
  lon: number;
  lat: number;
  message: string;
}

/**
 * Why a WGS 84 position is unusable, or null. `lonMax180` allows lon = 180 (GPX's schema does not).
 *
 * @example
 * positionProblem(10, 95); // 'latitude 95 is beyond ±90'
 */
export function positionProblem(lon: number, lat: number, lonMax180 = true): string | null {
  if (!Number.isFinite(lon) || !Number.isFinite(lat)) return `coordinate (${lon}, ${lat}) is not a finite number`;
  if (lat < -90 || lat > 90) return `latitude ${lat} is beyond ±90`;
  if (lon < -180 || lon > 180 || (!lonMax180 && lon === 180)) return `longitude ${lon} is beyond ${lonMax180 ? '±180' : '[-180, 180)'}`;
  return null;
}

/**
 * The 'out_of_range' error for a list of problems: the count and the first 50 in the details.
 *
 * @example
 * throw outOfRange([{ where: 'trkpt at line 12, column 5', lon: 10, lat: 95, message: 'latitude 95 is beyond ±90' }]);
 */
export function outOfRange(problems: RangeProblem[]): IngestError {
  const first = problems[0];
  const more = problems.length > 1 ? ` (and ${problems.length - 1} more)` : '';
  return new IngestError('out_of_range', `${problems.length} position${problems.length === 1 ? '' : 's'} out of range: ${first.where}: ${first.message}${more}`, {
    count: problems.length,
    problems: problems.slice(0, 50),
  });
}

/**
 * Check every position of parsed features; throws 'out_of_range' listing every bad one.
 *
 * @example
 * assertFeaturesInRange(upload.features);
 */
export function assertFeaturesInRange(features: ParsedFeature[], lonMax180 = true): void {
  const problems: RangeProblem[] = [];
  const check = (p: Position, where: string) => {
    const m = positionProblem(p[0], p[1], lonMax180);
    if (m) problems.push({ where, lon: p[0], lat: p[1], message: m });
  };
  features.forEach((f, i) => {
    const label = `feature ${i + 1}${f.name ? ` '${f.name}'` : ''}`;
    if (f.kind === 'point') check(f.coord, label);
    else f.coords.forEach((c, j) => check(c, `${label} position ${j + 1}`));
  });
  if (problems.length) throw outOfRange(problems);
}
