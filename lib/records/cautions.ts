/**
 * The usual cautions, shown wherever depths, clearances or laying temperatures are shown, and in the
 * files that carry them. They defer to local codes and licensed practice; they are not a method statement.
 */
export const CAUTIONS = {
  /** beside depths, covers, positions of ducts and other utilities */
  digging:
    'Recorded depths and positions must be verified on site before digging: locate with suitable detection equipment, follow the local notification rules for excavation, and hand-dig near marked facilities. Defer to local codes and licensed practice.',
  /** beside clearances to other utilities (gas, power, water…) */
  utilities:
    'Clearances to other utilities are as recorded at the time: a strike on a gas or power line can kill. Confirm on site with the utility owner and follow their rules and the local codes before any work near it.',
  /** beside laying temperatures and restoration */
  hotBitumen:
    'Hot bituminous material (laid at around 195 °C) causes severe burns: wear the protective clothing, gloves and eye protection your safety rules require, and follow the supplier’s safety data sheet and local codes.',
} as const;
export type CautionKind = keyof typeof CAUTIONS;
