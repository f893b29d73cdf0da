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
  /**
   * On the duct lookup and its printed sheet. The notification rule differs by country: 811 is the US
   * call-before-you-dig number [published: 47 CFR § 52.104, FCC]. The tolerance zone: facility width plus
   * 18 in (0.46 m) each side, Common Ground Alliance Best Practices [secondary]; HSE HSG47 "Avoiding danger
   * from underground services" (GB) on safe digging near marked services [published].
   */
  lookup:
    'Records are no substitute for locating on site: before digging, follow the local notification rules (for example 811 in the US), have the facilities located and marked, and hand-dig within the tolerance zone around marked facilities (in much US practice the facility’s width plus 18 in, 0.46 m, each side; in Great Britain see HSE HSG47). Positions are shown with their 95 % radius: the ducts may lie anywhere within it, or beyond. Defer to local codes and licensed practice.',
} as const;
export type CautionKind = keyof typeof CAUTIONS;
