/**
 * Address text as the register stores it for matching and search: lower case, accents and punctuation
 * removed, the usual street-type abbreviations spelled out, so that "Mill St.", "mill street" and
 * "Mill  Street" are the same street. The abbreviations are common English postal usage [practice].
 */

const STREET_WORDS: Record<string, string> = {
  st: 'street', str: 'street', rd: 'road', ave: 'avenue', av: 'avenue', ln: 'lane', dr: 'drive', ct: 'court',
  pl: 'place', sq: 'square', cres: 'crescent', cr: 'crescent', gdns: 'gardens', tce: 'terrace', terr: 'terrace',
  cl: 'close', pde: 'parade', hwy: 'highway', mt: 'mount', blvd: 'boulevard', wy: 'way', grn: 'green',
};

/** Lower case, no accents (NFD, combining marks dropped; ß → ss), punctuation as spaces, single spaces. */
export function normaliseText(s: string): string {
  return s
    .normalize('NFD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/ß/g, 'ss')
    .toLowerCase()
    .replace(/[^\p{L}\p{N}]+/gu, ' ')
    .trim()
    .replace(/\s+/g, ' ');
}

/** A street name normalised for matching: `normaliseStreet('Mill St.') === 'mill street'`. */
export function normaliseStreet(s: string): string {
  return normaliseText(s)
    .split(' ')
    .map((w) => STREET_WORDS[w] ?? w)
    .join(' ');
}

/**
 * A house number's numeric base and its suffix, for sorting and search:
 * "12a" → { base: 12, suffix: "a" }, "7-9" → { base: 7, suffix: "-9" }, "" → { base: null, suffix: "" }.
 */
export function parseHouseNumber(s: string): { base: number | null; suffix: string } {
  const m = /^\s*(\d{1,6})\s*(.*?)\s*$/.exec(s);
  if (!m) return { base: null, suffix: normaliseText(s) };
  return { base: Number(m[1]), suffix: m[2].toLowerCase().replace(/\s+/g, '') };
}
