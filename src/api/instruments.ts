import type { InstrumentCandidates, InstrumentSummary } from '@shared/api/instruments'
import type { StandardSummary, VersionSummary } from '@shared/api/standards'
import { http } from './http'

export type { CoverageCell, DecisionRecord, InstrumentCandidate, InstrumentCandidates, InstrumentSummary } from '@shared/api/instruments'

export interface InstrumentInput {
  name: string
  resolutionFwhm: number | null
  wavelengthMin: number | null
  wavelengthMax: number | null
  candidateMinSnr: number
  notes: string
}

/** The instruments of the campaigns the person belongs to, or of one campaign. */
export async function listInstruments(campaignId?: number): Promise<InstrumentSummary[]> {
  return (await http.get<{ instruments: InstrumentSummary[] }>('/instruments', { query: { campaign: campaignId } })).instruments
}

export async function createInstrument(campaignId: number, input: InstrumentInput): Promise<InstrumentSummary> {
  return (await http.post<{ instrument: InstrumentSummary }>('/instruments', { campaignId, ...input })).instrument
}

export async function updateInstrument(id: number, input: Partial<InstrumentInput>): Promise<InstrumentSummary> {
  return (await http.patch<{ instrument: InstrumentSummary }>(`/instruments/${id}`, input)).instrument
}

/** The instrument's candidate standards, its coverage in the active version and why other spectra are not proposed. */
export const getInstrumentCandidates = (id: number) => http.get<InstrumentCandidates>(`/instruments/${id}/candidates`)

export interface LibraryChange {
  version: VersionSummary
  standards: StandardSummary[]
}

/** Promotes candidates as the instrument's standards; publishes a new active version. */
export const promoteCandidates = (id: number, spectrumIds: number[], note: string) => http.post<LibraryChange>(`/instruments/${id}/promote`, { spectrumIds, note })

/** Demotes standards of the instrument; publishes a new active version without them. */
export const demoteStandards = (id: number, standardIds: number[], note: string) => http.post<LibraryChange>(`/instruments/${id}/demote`, { standardIds, note })
