/** Delimiters a survey CSV may use, in order of preference on a tie. */
const CANDIDATES = [',', ';', '\t'] as const;
export type Delimiter = (typeof CANDIDATES)[number];

/** Fields of a line split on `d` outside double quotes, counted without building them. */
function countFields(line: string, d: string): number {
  let n = 1;
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (ch === d && !quoted) n++;
  }
  return n;
}

/**
 * The delimiter of a CSV header line: the candidate that splits it into the most fields (at
 * least 2), or null when none does.
 *
 * @example
 * guessDelimiter('pt;east;north;height'); // ';'
 * guessDelimiter('just words'); // null
 */
export function guessDelimiter(header: string): Delimiter | null {
  let best: Delimiter | null = null;
  let bestCount = 1;
  for (const d of CANDIDATES) {
    const c = countFields(header, d);
    if (c > bestCount) {
      best = d;
      bestCount = c;
    }
  }
  return best;
}
