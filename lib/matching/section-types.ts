import type { LonLat } from './types';

export type SectionStatus = 'as_planned' | 'deviates' | 'unplanned' | 'not_built';

/** Observations of one upload matched onto one planned route, in time (or survey line) order. */
export interface RouteObservations {
  uploadId: string;
  /** per-axis horizontal σ of the source (m, 1-sigma) */
  sigmaM: number;
  /** RTK or total station: the measured line is authoritative */
  surveyGrade: boolean;
  laidOn: string | null;
  fixes: { chainageM: number; offsetM: number; t: number | null }[];
  /** the chainage intervals the source saw built, when the caller estimated them (e.g. per visit of a walk) */
  intervals?: [number, number][];
}

/** A stretch of the as-built record before it is given a lasting id. */
export interface SectionDraft {
  ref: string | null;
  fromChainageM: number;
  toChainageM: number;
  status: SectionStatus;
  coords: LonLat[];
  lengthM: number;
  maxOffsetM: number;
  p95OffsetM: number;
  /** 95 % horizontal radius of the as-built line's position (m) */
  accuracyM: number;
  sourceUploadIds: string[];
  laidOn: string | null;
  /** why a stretch is not built, or on what other source it is counted built (from a correction) */
  note?: string | null;
  /** the engineer's corrections that shaped this stretch */
  correctionIds?: number[];
  /** counted built on another source: nothing measured its offsets (its 0s are placeholders) */
  offsetsUnmeasured?: boolean;
}

export interface SectionOptions {
  /** the project's lateral tolerance (m) */
  toleranceM: number;
  /** slowly varying GNSS bias per axis (m, 1-sigma) of non-survey sources */
  biasSigmaM?: number;
  /** its correlation time (s) */
  biasTauS?: number;
  /** observations this far apart along a route (m) still count as one built stretch: a signal gap, not a gap in the trench */
  bridgeM?: number;
  /** half-width of the smoothing window along the route (m) */
  windowM?: number;
  /** shortest run that can be its own deviating stretch (m) */
  minRunM?: number;
  /** chainages where a section must end and the next begin (an engineer's split) */
  breaksM?: number[];
}
