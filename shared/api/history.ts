import { z } from 'zod'
import { PersonRef, idParams } from './common'
import { endpoint } from './endpoint'

export const HistoryKind = z.enum(['upload', 'reread', 'reprocess', 'measurement', 'suggestion', 'call', 'correction', 'dispute', 'agreed', 'settled'])
export type HistoryKind = z.infer<typeof HistoryKind>

/** One entry of a spectrum's history, oldest first. */
export const HistoryEvent = z
  .object({
    at: z.string(),
    kind: HistoryKind,
    /** Null for the pipeline. */
    who: PersonRef.nullable(),
    summary: z.string(),
    /** For calls: whether the suggestion had been shown to the caller, and the time they spent. */
    suggestionShown: z.boolean().optional(),
    secondsSpent: z.number().nullable().optional(),
    /** What each kind adds (the call, the decision, …). */
    details: z.record(z.string(), z.unknown()),
  })
  .meta({ id: 'HistoryEvent' })
export type HistoryEvent = z.infer<typeof HistoryEvent>

/** The whole history; `hidden` when blind review keeps some of it back from the caller. */
export const SpectrumHistory = z.object({ events: z.array(HistoryEvent), hidden: z.boolean() }).meta({ id: 'SpectrumHistory' })
export type SpectrumHistory = z.infer<typeof SpectrumHistory>

export const historyApi = {
  get: endpoint({ method: 'get', path: '/spectra/:id/history', tag: 'Spectra', summary: "A spectrum's history, oldest first (blind review applied)", params: idParams, response: SpectrumHistory }),
}
