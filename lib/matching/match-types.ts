/** Types of the hidden-Markov map matcher (Newson & Krumm 2009): fixes in, matched positions on the plan out. */

/** One position of a trace: a handheld/GNSS fix (t in epoch seconds) or a survey point (t null, order = seq). */
export interface Fix {
  lon: number;
  lat: number;
  /** epoch seconds; null for survey points, which are matched in the given order */
  t: number | null;
  /** the caller's identity of the fix, echoed in the result */
  seq: number;
}

export interface MatchOptions {
  /** standard deviation of the position noise in metres (Newson & Krumm's σ_z), e.g. 4 handheld, 0.05 RTK */
  sigmaM: number;
  /** scale of the transition exponential in metres (Newson & Krumm's β); default 3 */
  betaM?: number;
  /** candidates farther than this are not considered; default max(4σ, 10 m) */
  searchRadiusM?: number;
  /** candidates kept per fix (best one per route); default 5 */
  maxCandidates?: number;
  /**
   * fixes closer than this to the last fix kept skip the Viterbi recursion and are placed afterwards on
   * their neighbours' route (Newson & Krumm 2009, §4.1); default 2σ, 0 keeps every fix in the recursion
   */
  thinM?: number;
  /** a fix further from where its neighbours put it than this speed allows is an outlier; default 8 m/s */
  maxSpeedMps?: number;
  /** a track is split where consecutive timed fixes are further apart in time; default 30 s */
  gapSeconds?: number;
  /** a track is split where consecutive fixes without time are further apart; default 50 m */
  gapMetres?: number;
}

/** A fix placed on the plan. */
export interface MatchedFix {
  seq: number;
  /** the route the fix was matched to */
  ref: string;
  /** metres along that route (geodesic, consistent with lineLengthM) */
  chainageM: number;
  /** signed lateral offset: + left of the route's drawing direction, − right */
  offsetM: number;
  /** unsigned distance from the fix to the route */
  distanceM: number;
  /** the fix's time, echoed (null for survey points) */
  t: number | null;
}

export interface MatchResult {
  /** in input order; only the fixes that were matched */
  matched: MatchedFix[];
  /** runs of ≥ 3 consecutive fixes farther than the search radius from every route (unplanned stretches) */
  unmatched: Fix[][];
  /** seqs dropped as isolated spikes or as 1–2 stray fixes off the network */
  outliers: number[];
  /** track pieces after splitting at time or distance gaps */
  pieces: number;
}

/** Options with their defaults filled in. */
export type ResolvedMatchOptions = Required<MatchOptions>;

/**
 * Fills in the defaults of MatchOptions.
 * `resolveMatchOptions({ sigmaM: 4 })` → `{ sigmaM: 4, betaM: 3, searchRadiusM: 16, maxCandidates: 5, thinM: 8, maxSpeedMps: 8, gapSeconds: 30, gapMetres: 50 }`
 */
export function resolveMatchOptions(opts: MatchOptions): ResolvedMatchOptions {
  if (!(opts.sigmaM > 0)) throw new RangeError('sigmaM must be a positive number of metres');
  return {
    sigmaM: opts.sigmaM,
    betaM: opts.betaM ?? 3,
    // 4σ holds 99.97 % of cross-track noise; 10 m keeps RTK surveys from losing a route to a 1 m as-built shift
    searchRadiusM: opts.searchRadiusM ?? Math.max(4 * opts.sigmaM, 10),
    maxCandidates: opts.maxCandidates ?? 5,
    thinM: opts.thinM ?? 2 * opts.sigmaM,
    maxSpeedMps: opts.maxSpeedMps ?? 8,
    gapSeconds: opts.gapSeconds ?? 30,
    gapMetres: opts.gapMetres ?? 50,
  };
}
