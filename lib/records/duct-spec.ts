/**
 * The plan's `ducts` attribute: how many microducts of which size a route is to get. Designs write it as
 * count × outer diameter in mm, sometimes with the inner diameter: `12x7mm`, `7x7mm`, `1x14mm`, `4x7mm`,
 * `2x14/10`, `12x7/4`, `12 × 7/3.5 mm`; a mixed bundle joins groups with `+`, `,` or `;`:
 * `12x7/4+2x14/10`. A lone size (`14/10`, `7mm`) is one duct.
 *
 * `parseDuctSpec('12x7/4+2x14/10')` → `{ ok: true, groups: [{ count: 12, outerMm: 7, innerMm: 4 }, { count: 2, outerMm: 14, innerMm: 10 }], total: 14 }`
 */

export interface DuctGroup {
  count: number;
  outerMm: number;
  /** null when the plan gives only the outer diameter */
  innerMm: number | null;
}

export type DuctSpec = { ok: true; groups: DuctGroup[]; total: number } | { ok: false; message: string };

/** More ducts than this in one trench is not a microduct bundle but a typo. */
export const MAX_DUCTS_IN_BUNDLE = 96;
/** Microducts run from 3 mm (nano) to about 50 mm outer [practice]; 100 mm is the catalogue's ceiling. */
const OUTER_MM = { min: 3, max: 100 };

const NUMBER = String.raw`(\d+(?:[.,]\d+)?)`;
const GROUP = new RegExp(String.raw`^(?:(\d+)\s*[x×*]\s*)?${NUMBER}(?:\s*/\s*${NUMBER})?\s*(?:mm)?$`, 'i');
const num = (s: string) => Number(s.replace(',', '.'));

/** Parses the plan's `ducts` text; refusals say what was not understood, in words for the plan page. */
export function parseDuctSpec(text: string | null | undefined): DuctSpec {
  const t = (text ?? '').trim();
  if (t === '') return { ok: false, message: 'The plan gives no ducts for this route.' };
  const groups: DuctGroup[] = [];
  // a comma between digits is a decimal comma (7/3,5), elsewhere it separates groups
  for (const raw of t.split(/\s*(?:\+|;|,(?!\d))\s*/)) {
    const m = GROUP.exec(raw.trim());
    if (!m) return { ok: false, message: `'${raw.trim()}' is not a duct size: write count × outer/inner mm, e.g. 12x7/4 or 2x14mm.` };
    const count = m[1] === undefined ? 1 : Number(m[1]);
    const outerMm = num(m[2]);
    const innerMm = m[3] === undefined ? null : num(m[3]);
    if (count < 1) return { ok: false, message: `'${raw.trim()}' asks for no ducts.` };
    if (outerMm < OUTER_MM.min || outerMm > OUTER_MM.max) return { ok: false, message: `'${raw.trim()}': an outer diameter of ${outerMm} mm is not a microduct (${OUTER_MM.min}–${OUTER_MM.max} mm).` };
    if (innerMm !== null && (innerMm <= 0 || innerMm >= outerMm)) return { ok: false, message: `'${raw.trim()}': the inner diameter must be above 0 and below the outer ${outerMm} mm.` };
    groups.push({ count, outerMm, innerMm });
  }
  const total = groups.reduce((n, g) => n + g.count, 0);
  if (total > MAX_DUCTS_IN_BUNDLE) return { ok: false, message: `${total} ducts in one trench is more than ${MAX_DUCTS_IN_BUNDLE}: check the plan's ducts attribute.` };
  return { ok: true, groups, total };
}

const mm = (n: number) => String(Number(n.toFixed(2)));

/** A size in the trade's writing: "7/4 mm", or "7 mm" with no inner diameter. */
export function sizeText(outerMm: number, innerMm: number | null): string {
  return innerMm === null ? `${mm(outerMm)} mm` : `${mm(outerMm)}/${mm(innerMm)} mm`;
}

/**
 * A bundle's ducts in short: consecutive runs of one size become groups.
 * `bundleSummary([{outerMm:7,innerMm:4}, {outerMm:7,innerMm:4}, {outerMm:14,innerMm:10}])` → "2 × 7/4 mm + 1 × 14/10 mm".
 */
export function bundleSummary(ducts: { outerMm: number; innerMm: number | null }[]): string {
  if (ducts.length === 0) return 'no ducts';
  const groups: DuctGroup[] = [];
  for (const d of ducts) {
    const last = groups[groups.length - 1];
    if (last && last.outerMm === d.outerMm && last.innerMm === d.innerMm) last.count++;
    else groups.push({ count: 1, outerMm: d.outerMm, innerMm: d.innerMm });
  }
  return groups.map((g) => `${g.count} × ${sizeText(g.outerMm, g.innerMm)}`).join(' + ');
}
