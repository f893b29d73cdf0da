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

/** 95 % horizontal radius of a circular normal error with σ per axis: R95 = 2.4477 σ [computed]. */
export const R95_FACTOR = 2.4477;
