/** A header as the aliases spell it: lower case, spaces, dots and dashes as underscores. */
export const normaliseHeader = (h: string) => h.trim().toLowerCase().replace(/[\s.-]+/g, '_').replace(/^_|_$/g, '');

/**
 * Map headers to columns by their usual names, keys in the aliases' order; each header is used at most once.
 * `guessByAliases(['Pt', 'Easting'], { id: ['pt'], x: ['easting'] })` → `{ id: 'Pt', x: 'Easting' }`
 */
export function guessByAliases<K extends string>(headers: string[], aliases: Record<K, readonly string[]>): Partial<Record<K, string>> {
  const map: Partial<Record<K, string>> = {};
  const used = new Set<string>();
  for (const key of Object.keys(aliases) as K[]) {
    for (const alias of aliases[key]) {
      const h = headers.find((x) => normaliseHeader(x) === alias && !used.has(x));
      if (h) {
        map[key] = h;
        used.add(h);
        break;
      }
    }
  }
  return map;
}
