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

/** The decided classification as text, whichever shape the API gives it in; null when there is none yet. */
export function classificationText(value: unknown): string | null {
  if (value == null) return null
  if (typeof value === 'string') return value.trim() || null
  if (typeof value === 'object') {
    const v = value as { text?: unknown; spectralType?: unknown; luminosityClass?: unknown; mk?: unknown }
    if (typeof v.text === 'string' && v.text) return v.text
    if (typeof v.mk === 'string' && v.mk) return v.mk
    const parts = [v.spectralType, v.luminosityClass].filter((p): p is string => typeof p === 'string' && p !== '')
    return parts.length ? parts.join(' ') : null
  }
  return null
}
