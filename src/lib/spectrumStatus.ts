import type { FinalClassification } from '@shared/api/review'
import type { SpectrumStatus } from '@shared/status'

/** naive-ui tag types for each status, so every screen colours them alike. */
export const STATUS_TAG_TYPES: Record<SpectrumStatus, 'default' | 'info' | 'success' | 'warning' | 'error'> = {
  received: 'default',
  measured: 'info',
  suggested: 'info',
  under_review: 'warning',
  agreed: 'success',
  disputed: 'error',
  settled: 'success',
  failed: 'error',
}

/** The decided classification as text (its MK notation already carries the class); null when there is none yet. */
export function classificationText(value: FinalClassification | null): string | null {
  return value?.spectralType.trim() || null
}
