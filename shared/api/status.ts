import type { SpectrumStatus } from '../status'

/** Where a spectrum stands now, for pages that follow it while it is processed. */
export interface SpectrumLiveStatus {
  id: number
  status: SpectrumStatus
  statusReason: string | null
  /** The processing job: queued (with its place in line), running, or none. */
  job: { state: 'queued'; position: number; ofQueued: number } | { state: 'running' } | null
}
