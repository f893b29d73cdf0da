import { z } from 'zod';
import { RANGES, rangedNumber } from './plausible-ranges';

/** The household settings as a person sets them (project settings): each within its plausible range. */
export const householdSettingsSchema = z.object({
  serveDistanceM: rangedNumber(RANGES.serveDistanceM),
  crossingServeDistanceM: rangedNumber(RANGES.crossingServeDistanceM),
  footToleranceM: rangedNumber(RANGES.footToleranceM),
}).partial();
