/**
 * The one source of the sections' status and review colours and words: the map, the table's badges, the
 * legends and the exports all read them from here, so "unplanned" is the same colour everywhere.
 *
 * The built statuses take colours of Okabe & Ito's palette ("Color Universal Design", 2008) [published], not
 * built a dark grey: all stay apart under the common colour-vision deficiencies (tests/unit/section-status.test.ts
 * simulates them), and not built is also drawn dashed, so it never rests on colour alone.
 */
export const STATUS_STYLE = {
  as_planned: { colour: '#009e73', label: 'as planned', tone: 'ok' },
  deviates: { colour: '#e69f00', label: 'deviates', tone: 'warn' },
  unplanned: { colour: '#cc79a7', label: 'unplanned', tone: 'info' },
  not_built: { colour: '#4d4d4d', label: 'not built', tone: 'muted' },
} as const;

export type SectionStatusKey = keyof typeof STATUS_STYLE;

/** The planned route under the sections, drawn dashed on every map of planned against built. */
export const PLANNED_COLOUR = '#0072b2';

/** A review is settled when it is approved, or when a not-built stretch is acknowledged with a reason. */
export const REVIEW_STYLE = {
  pending: { label: 'pending', tone: 'muted', settled: false },
  approved: { label: 'approved', tone: 'ok', settled: true },
  acknowledged: { label: 'acknowledged', tone: 'ok', settled: true },
  rejected: { label: 'rejected', tone: 'bad', settled: false },
} as const;

export type SectionReviewKey = keyof typeof REVIEW_STYLE;
