/**
 * The colour of a duct in a bundle, from the project's colour sequence. Positions 1…L (L = the sequence's
 * length, 12 for TIA-598) take the sequence's colours in order; L+1…2L repeat the same base colours with the
 * sequence's repeat marking (a stripe or a tracer): position 13 of TIA-598 is "blue with stripe".
 *
 * Beyond 2L there is no marking the sequence defines (TIA-598 names 24 colours this way; a microduct
 * bundle of more than 24 is made of sub-bundles, each with its own sequence), so a position beyond 2L is
 * refused rather than given an invented second stripe: `ductColour(seq, 25)` → null, and the forms and the
 * API say so (`maxColourPosition`).
 */

export type RepeatMarking = 'stripe' | 'tracer';

export interface ColourSequenceLike {
  repeatMarking: RepeatMarking;
  colours: { position: number; name: string; hex: string }[];
}

export interface DuctColour {
  /** the position in the sequence asked for (1-based) */
  position: number;
  /** the base colour's name and screen rendering */
  name: string;
  hex: string;
  /** null for the first L positions, else the sequence's repeat marking */
  marking: RepeatMarking | null;
  /** what a person reads: "blue", "blue with stripe" */
  label: string;
}

/** The highest colour position a sequence names: twice its length (0 for an empty sequence). */
export function maxColourPosition(seq: ColourSequenceLike): number {
  return seq.colours.length * 2;
}

/** "blue", "blue with stripe", "blue with tracer". */
export function colourLabel(name: string, marking: RepeatMarking | null): string {
  return marking ? `${name} with ${marking}` : name;
}

/**
 * The colour of position n: `ductColour(tia598, 2)` → orange; `ductColour(tia598, 14)` → "orange with
 * stripe"; `ductColour(tia598, 25)` → null (beyond the marked repeat).
 */
export function ductColour(seq: ColourSequenceLike, n: number): DuctColour | null {
  const ordered = [...seq.colours].sort((a, b) => a.position - b.position);
  const L = ordered.length;
  if (!Number.isInteger(n) || n < 1 || n > 2 * L) return null;
  const base = ordered[(n - 1) % L];
  const marking = n > L ? seq.repeatMarking : null;
  return { position: n, name: base.name, hex: base.hex, marking, label: colourLabel(base.name, marking) };
}

/** Every colour a sequence names, in order (2L entries): the options of a colour picker. */
export function allDuctColours(seq: ColourSequenceLike): DuctColour[] {
  const out: DuctColour[] = [];
  for (let n = 1; n <= maxColourPosition(seq); n++) out.push(ductColour(seq, n)!);
  return out;
}
