/**
 * One colour per decision state, shared by the progress bars and the HR diagram. From the
 * colour-blind-safe set of Okabe & Ito (2008), readable on light and dark backgrounds.
 */
export const DECISION_COLOURS = {
  settled: '#0072b2',
  agreed: '#009e73',
  disputed: '#d55e00',
  underReview: '#e69f00',
  waiting: '#56b4e9',
  processing: '#999999',
  failed: '#cc79a7',
} as const

/** The colour of a spectrum's status. */
export function statusColour(status: string): string {
  switch (status) {
    case 'settled':
      return DECISION_COLOURS.settled
    case 'agreed':
      return DECISION_COLOURS.agreed
    case 'disputed':
      return DECISION_COLOURS.disputed
    case 'under_review':
      return DECISION_COLOURS.underReview
    case 'suggested':
      return DECISION_COLOURS.waiting
    case 'failed':
      return DECISION_COLOURS.failed
    default:
      return DECISION_COLOURS.processing
  }
}
