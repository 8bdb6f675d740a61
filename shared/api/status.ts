import { z } from 'zod'
import { SPECTRUM_STATUSES } from '../status'
import { idParams } from './common'
import { endpoint } from './endpoint'

/** Where a spectrum stands now, for pages that follow it while it is processed. */
export const SpectrumLiveStatus = z
  .object({
    id: z.number().int(),
    status: z.enum(SPECTRUM_STATUSES),
    statusReason: z.string().nullable(),
    /** The processing job: queued (with its place in line), running, or none. */
    job: z.union([z.object({ state: z.literal('queued'), position: z.number().int(), ofQueued: z.number().int() }), z.object({ state: z.literal('running') })]).nullable(),
  })
  .meta({ id: 'SpectrumLiveStatus' })
export type SpectrumLiveStatus = z.infer<typeof SpectrumLiveStatus>

export const statusApi = {
  get: endpoint({
    method: 'get',
    path: '/spectra/:id/status',
    tag: 'Spectra',
    summary: 'Where a spectrum stands now (its processing job and place in line)',
    params: idParams,
    response: SpectrumLiveStatus,
  }),
}
