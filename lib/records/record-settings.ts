import { z } from 'zod';
import { RANGES, rangedNumber } from './plausible-ranges';

/**
 * The record settings as a person sets them; each within its plausible range. Millimetres are stored whole:
 * a width typed in inches is rounded to the millimetre.
 */
export const recordSettingsSchema = z.object({
  trenchWidthMm: rangedNumber(RANGES.trenchWidthMm).transform(Math.round),
  trenchDepthMm: rangedNumber(RANGES.trenchDepthMm).transform(Math.round),
  minClearanceM: rangedNumber(RANGES.minClearanceM),
  gapThresholdM: rangedNumber(RANGES.gapThresholdM),
  restorationMaxDelayMin: rangedNumber(RANGES.restorationMaxDelayMin, { int: true }),
  layingTempTargetC: rangedNumber(RANGES.layingTempTargetC),
  layingTempToleranceC: rangedNumber(RANGES.layingTempToleranceC),
  compactionPassesDefault: rangedNumber(RANGES.compactionPassesDefault, { int: true }),
  surfaceThicknessMm: rangedNumber(RANGES.surfaceThicknessMm).transform(Math.round),
  colourSequenceId: z.uuid('Pick a colour sequence from the catalogue.').nullable(),
}).partial();

/** The same schema, as the settings form uses it. */
export const recordSettingsFormSchema = recordSettingsSchema;
