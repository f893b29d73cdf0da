// Okabe–Ito colours: distinguishable under the common colour-vision deficiencies
export const STATUS_STYLE = {
  as_planned: { colour: '#009e73', label: 'as planned', tone: 'ok' },
  deviates: { colour: '#e69f00', label: 'deviates', tone: 'warn' },
  unplanned: { colour: '#cc79a7', label: 'unplanned', tone: 'info' },
  not_built: { colour: '#999999', label: 'not built', tone: 'muted' },
} as const;

export const REVIEW_TONE = { approved: 'ok', rejected: 'bad', pending: 'muted' } as const;
