import type { StandardProvenance, StandardSummary, StandardsLibrary, VersionChanges, VersionSummary } from '@shared/api/standards'
import type { DecodedSeries } from '@/lib/series'
import { http } from './http'
import { getSeries } from './series'

export type { StandardProvenance, StandardSource, StandardSummary, StandardsLibrary, VersionChanges } from '@shared/api/standards'
/** A published (or draft) set of standards; suggestions record which one made them. */
export type LibraryVersionSummary = VersionSummary

export interface AddObservedStandardInput {
  spectrumId: number
  spectralType: string
  luminosityClass: string
  note: string
}

export interface PublishVersionInput {
  name: string
  description: string
}

type Raw = Record<string, unknown>
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null)
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null)
const iso = (v: unknown): string | null => (typeof v === 'string' ? v : v instanceof Date ? v.toISOString() : null)

/** A version as GET /api/standards sends it (the publisher as a user id; null for the shipped library). */
export function toVersion(raw: Raw): LibraryVersionSummary {
  return {
    id: num(raw.id) ?? 0,
    name: str(raw.name) ?? '',
    description: str(raw.description) ?? '',
    status: raw.status === 'draft' ? 'draft' : 'published',
    isActive: raw.isActive === true,
    publishedAt: iso(raw.publishedAt),
    publishedBy: num(raw.publishedBy),
    standardCount: num(raw.standardCount) ?? 0,
    instrumentId: num(raw.instrumentId),
    basedOnId: num(raw.basedOnId),
    changes: raw.changes && typeof raw.changes === 'object' ? (raw.changes as VersionChanges) : null,
  }
}

export function toStandard(raw: Raw): StandardSummary {
  return {
    id: num(raw.id) ?? 0,
    source: raw.source === 'observed' ? 'observed' : 'model',
    modelId: str(raw.modelId),
    templateId: str(raw.templateId),
    star: str(raw.star),
    origin: str(raw.origin),
    spectrumId: num(raw.spectrumId),
    spectralType: str(raw.spectralType) ?? '',
    typeCode: num(raw.typeCode) ?? 0,
    luminosityClass: str(raw.luminosityClass) ?? '',
    classCode: num(raw.classCode) ?? 0,
    teff: num(raw.teff),
    logg: num(raw.logg),
    feh: num(raw.feh),
    resolutionFwhm: num(raw.resolutionFwhm),
    note: str(raw.note) ?? '',
    addedBy: num(raw.addedBy),
    retiredAt: iso(raw.retiredAt),
    createdAt: iso(raw.createdAt) ?? '',
    versionIds: Array.isArray(raw.versionIds) ? raw.versionIds.filter((v): v is number => typeof v === 'number') : [],
    instrumentId: num(raw.instrumentId),
    provenance: raw.provenance && typeof raw.provenance === 'object' ? (raw.provenance as StandardProvenance) : null,
  }
}

export async function getStandardsLibrary(): Promise<StandardsLibrary> {
  const body = await http.get<{ activeVersionId?: number | null; versions?: Raw[]; standards?: Raw[] }>('/standards')
  const versions = (body.versions ?? []).map(toVersion)
  return { activeVersionId: body.activeVersionId ?? versions.find((v) => v.isActive)?.id ?? null, versions, standards: (body.standards ?? []).map(toStandard) }
}

export async function addObservedStandard(input: AddObservedStandardInput): Promise<StandardSummary> {
  const body = await http.post<{ standard: Raw }>('/standards', input)
  return toStandard(body.standard)
}

export async function retireStandard(id: number): Promise<StandardSummary> {
  const body = await http.post<{ standard: Raw }>(`/standards/${id}/retire`)
  return toStandard(body.standard)
}

export async function publishVersion(input: PublishVersionInput): Promise<LibraryVersionSummary> {
  const body = await http.post<{ version: Raw }>('/standards/versions', input)
  return toVersion(body.version)
}

export interface ResuggestResult {
  queued: number
  /** Spectra already waiting for processing, left as they are. */
  skipped: number
  libraryVersionId: number
}

/** Queues every spectrum of the campaign to be suggested again against the active version. */
export const resuggestCampaign = (campaignId: number) => http.post<ResuggestResult>(`/campaigns/${campaignId}/resuggest`)

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
  const body = await http.get<{ items: Raw[] }>('/spectra', { query: { q: asId === null && text ? text : undefined, pageSize: 20, sort: '-createdAt' } })
  let items = body.items.map((s) => ({
    id: num(s.id) ?? 0,
    objectName: str(s.objectName) ?? '',
    status: str(s.status) ?? '',
    campaignCode: str((s.campaign as Raw | undefined)?.code) ?? '',
    snr: num(s.snr),
  }))
  if (asId !== null) {
    const exact = items.find((s) => s.id === asId)
    if (!exact) {
      try {
        const one = await http.get<{ spectrum: Raw }>(`/spectra/${asId}`, { quiet: true })
        const s = one.spectrum
        items = [{ id: num(s.id) ?? asId, objectName: str(s.objectName) ?? '', status: str(s.status) ?? '', campaignCode: str((s.campaign as Raw | undefined)?.code) ?? '', snr: num(s.snr) }]
      } catch {
        items = []
      }
    } else items = [exact]
  }
  return items
}
