// The colours and words live in lib/records/section-status.ts, shared with the exports.
export { PLANNED_COLOUR, STATUS_STYLE, REVIEW_STYLE } from '@/lib/records/section-status';
import { REVIEW_STYLE } from '@/lib/records/section-status';

export const REVIEW_TONE = Object.fromEntries(Object.entries(REVIEW_STYLE).map(([k, v]) => [k, v.tone])) as { [K in keyof typeof REVIEW_STYLE]: (typeof REVIEW_STYLE)[K]['tone'] };
