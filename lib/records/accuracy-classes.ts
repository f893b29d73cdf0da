export const ACCURACY_CLASSES = ['handheld_gnss', 'rtk_gnss', 'total_station', 'digitised', 'unknown'] as const;
export type AccuracyClass = (typeof ACCURACY_CLASSES)[number];

export const ACCURACY_CLASS_LABELS: Record<AccuracyClass, string> = {
  handheld_gnss: 'Handheld GNSS',
  rtk_gnss: 'RTK GNSS',
  total_station: 'Total station',
  digitised: 'Digitised from a plan',
  unknown: 'Unknown',
};

/**
 * Default horizontal σ per axis (1-sigma, metres) of each class; a project may override them.
 * handheld: Newson & Krumm (2009) measured σz = 4.07 m for consumer GPS [secondary]; we round to 4.
 * RTK: 8 mm + 1 ppm RMS is a typical manufacturer specification [published], "1–2 cm" in practice [practice].
 * total station: a few millimetres to a centimetre over site distances [practice].
 * digitised and unknown: our own conservative choices.
 */
export const DEFAULT_SIGMA_M: Record<AccuracyClass, number> = {
  handheld_gnss: 4,
  rtk_gnss: 0.02,
  total_station: 0.01,
  digitised: 1,
  unknown: 5,
};

/**
 * The 95 % horizontal radius of a circular normal error, in units of its σ per axis: the radius r with
 * P(|e| ≤ r) = 1 − exp(−r² / 2σ²) = 0.95 (the Rayleigh distribution), r = σ √(−2 ln 0.05) = 2.44775 σ, the
 * square root of the chi-square 95 % quantile for 2 degrees of freedom (5.9915) [computed]; rounded to 2.4477
 * as every stored section's radius has been. The one definition: matching, corrections and the pages use it.
 * `R95_FACTOR * 0.02` → 0.049 m, the 95 % radius of an RTK fix of σ 2 cm
 */
export const R95_FACTOR = 2.4477;
