export const ACCURACY_CLASS_LABELS = {
  handheld_gnss: 'Handheld GNSS',
  rtk_gnss: 'RTK GNSS',
  total_station: 'Total station',
  digitised: 'Digitised from a plan',
  unknown: 'Unknown',
} as const;
