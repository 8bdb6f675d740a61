/** Where a spectrum is in its life: received → measured → suggested → under review → agreed | disputed → settled. */
export const SPECTRUM_STATUSES = ['received', 'measured', 'suggested', 'under_review', 'agreed', 'disputed', 'settled', 'failed'] as const
export type SpectrumStatus = (typeof SPECTRUM_STATUSES)[number]

export const STATUS_LABELS: Record<SpectrumStatus, string> = {
  received: 'Received',
  measured: 'Measured',
  suggested: 'Suggested',
  under_review: 'Under review',
  agreed: 'Agreed',
  disputed: 'Disputed',
  settled: 'Settled',
  failed: 'Failed',
}
