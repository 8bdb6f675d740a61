import { spectraApi } from '@shared/api/spectra'
import { standardsApi, type AddStandardInput, type PublishVersionInput, type ResuggestReply, type StandardSummary, type StandardsLibrary, type VersionSummary } from '@shared/api/standards'
import type { DecodedSeries } from '@/lib/series'
import { call } from './http'
import { getSeries } from './series'

export type { StandardProvenance, StandardSource, StandardSummary, StandardsLibrary, VersionChanges } from '@shared/api/standards'
export type { PublishVersionInput }
/** A published (or draft) set of standards; suggestions record which one made them. */
export type LibraryVersionSummary = VersionSummary
export type AddObservedStandardInput = AddStandardInput

export const getStandardsLibrary = (): Promise<StandardsLibrary> => call(standardsApi.library)

export const addObservedStandard = async (input: AddObservedStandardInput): Promise<StandardSummary> => (await call(standardsApi.add, { body: input })).standard

export const retireStandard = async (id: number): Promise<StandardSummary> => (await call(standardsApi.retire, { params: { id } })).standard

export const publishVersion = async (input: PublishVersionInput): Promise<LibraryVersionSummary> => (await call(standardsApi.publish, { body: input })).version

/** Spectra queued; `skipped`: already waiting for processing, left as they are. */
export type ResuggestResult = ResuggestReply

/** Queues every spectrum of the campaign to be suggested again against the active version. */
export const resuggestCampaign = (campaignId: number): Promise<ResuggestResult> => call(standardsApi.resuggest, { params: { id: campaignId } })

/** The standard's flux on the library grid (binary, not JSON, so it bypasses the JSON wrapper). */
export const getStandardSeries = (id: number, signal?: AbortSignal): Promise<DecodedSeries> => getSeries(`/standards/${id}/data`, { signal })

/** A spectrum that could become an observed standard, as the picker shows it. */
export interface SpectrumChoice {
  id: number
  objectName: string
  status: string
  campaignCode: string
  snr: number | null
}

/** Uploaded spectra matching an id or an object name, for the observed-standard picker. */
export async function findSpectra(q: string): Promise<SpectrumChoice[]> {
  const text = q.trim()
  const asId = /^#?\d+$/.test(text) ? Number(text.replace('#', '')) : null
  const choice = (s: { id: number; objectName: string; status: string; campaign: { code: string }; snr: number | null }): SpectrumChoice => ({
    id: s.id,
    objectName: s.objectName,
    status: s.status,
    campaignCode: s.campaign.code,
    snr: s.snr,
  })
  const body = await call(spectraApi.list, { query: { q: asId === null && text ? text : undefined, pageSize: 20, sort: '-createdAt' } })
  const items = body.items.map(choice)
  if (asId === null) return items
  const exact = items.find((s) => s.id === asId)
  if (exact) return [exact]
  try {
    return [choice((await call(spectraApi.get, { params: { id: asId } }, { quiet: true })).spectrum)]
  } catch {
    return []
  }
}
