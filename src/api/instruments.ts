import { instrumentsApi, type InstrumentSummary, type LibraryChange } from '@shared/api/instruments'
import { call } from './http'

export type { CoverageCell, DecisionRecord, InstrumentCandidate, InstrumentCandidates, InstrumentSummary, LibraryChange } from '@shared/api/instruments'

export interface InstrumentInput {
  name: string
  resolutionFwhm: number | null
  wavelengthMin: number | null
  wavelengthMax: number | null
  candidateMinSnr: number
  notes: string
}

/** The instruments of the campaigns the person belongs to, or of one campaign. */
export const listInstruments = async (campaignId?: number): Promise<InstrumentSummary[]> => (await call(instrumentsApi.list, { query: { campaign: campaignId } })).instruments

export const createInstrument = async (campaignId: number, input: InstrumentInput): Promise<InstrumentSummary> => (await call(instrumentsApi.create, { body: { campaignId, ...input } })).instrument

export const updateInstrument = async (id: number, input: Partial<InstrumentInput>): Promise<InstrumentSummary> => (await call(instrumentsApi.update, { params: { id }, body: input })).instrument

/** The instrument's candidate standards, its coverage in the active version and why other spectra are not proposed. */
export const getInstrumentCandidates = (id: number) => call(instrumentsApi.candidates, { params: { id } })

/** Promotes candidates as the instrument's standards; publishes a new active version. */
export const promoteCandidates = (id: number, spectrumIds: number[], note: string): Promise<LibraryChange> => call(instrumentsApi.promote, { params: { id }, body: { spectrumIds, note } })

/** Demotes standards of the instrument; publishes a new active version without them. */
export const demoteStandards = (id: number, standardIds: number[], note: string): Promise<LibraryChange> => call(instrumentsApi.demote, { params: { id }, body: { standardIds, note } })
