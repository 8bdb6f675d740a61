import { z } from 'zod'
import type { CoverageCell as CoverageCellType } from '../coverage'
import { CAMPAIGN_REGION_LIMITS } from '../grid'
import { CampaignRef, idParams, multiLine, numeric, singleLine } from './common'
import { endpoint } from './endpoint'
import { DecisionRecord, StandardSummary, VersionSummary } from './standards'

export { DecisionRecord }

/** A cell of type × class coverage (shared/coverage.ts). */
export const CoverageCell = z.object({ typeCode: z.number(), classCode: z.number(), label: z.string() }) satisfies z.ZodType<CoverageCellType>
export type CoverageCell = z.infer<typeof CoverageCell>

/** An instrument of a campaign, as GET /api/instruments lists it. */
export const InstrumentSummary = z
  .object({
    id: z.number().int(),
    campaign: CampaignRef,
    name: z.string(),
    /** Resolution, FWHM Å; a spectrum that gives none is matched at it. */
    resolutionFwhm: z.number().nullable(),
    /** Wavelength coverage, Å. */
    wavelengthRange: z.tuple([z.number(), z.number()]).nullable(),
    /** S/N a decided spectrum needs to be proposed as one of its standards. */
    candidateMinSnr: z.number(),
    notes: z.string(),
    /** Spectra taken with it. */
    spectra: z.number().int(),
    /** Its own standards in the active library version. */
    standards: z.number().int(),
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: 'Instrument' })
export type InstrumentSummary = z.infer<typeof InstrumentSummary>

/** A decided spectrum of the instrument that may be promoted as one of its standards. */
export const InstrumentCandidate = z.object({
  spectrumId: z.number().int(),
  objectName: z.string(),
  snr: z.number(),
  decision: DecisionRecord,
  /** The suggestion it has now (without quality flags, or it would not be a candidate). */
  suggestion: z.object({ id: z.number().int(), spectralType: z.string(), libraryVersionId: z.number().int() }),
  /** The gap in type × class coverage it fills. */
  cell: CoverageCell,
  /** The best candidate of its cell (highest S/N); promoting several for one cell at once is refused. */
  firstInCell: z.boolean(),
})
export type InstrumentCandidate = z.infer<typeof InstrumentCandidate>

/** GET /api/instruments/:id/candidates */
export const InstrumentCandidates = z
  .object({
    instrument: InstrumentSummary,
    activeVersionId: z.number().int().nullable(),
    /** Cells the instrument's standards of the active version fill. */
    coverage: z.array(CoverageCell),
    candidates: z.array(InstrumentCandidate),
    /** Spectra of the instrument not proposed, counted by why. */
    passedOver: z.array(z.object({ reason: z.string(), count: z.number().int() })),
  })
  .meta({ id: 'InstrumentCandidates' })
export type InstrumentCandidates = z.infer<typeof InstrumentCandidates>

/** A promotion or demotion: the version it published and the standards it changed. */
export const LibraryChange = z.object({ version: VersionSummary, standards: z.array(StandardSummary) }).meta({ id: 'LibraryChange' })
export type LibraryChange = z.infer<typeof LibraryChange>

const edge = numeric(
  z
    .number({ message: 'must be a number' })
    .min(CAMPAIGN_REGION_LIMITS[0], `must be at least ${CAMPAIGN_REGION_LIMITS[0]} Å`)
    .max(CAMPAIGN_REGION_LIMITS[1], `must be at most ${CAMPAIGN_REGION_LIMITS[1]} Å`),
)

const rules = {
  name: singleLine(120).pipe(z.string().min(1, 'is required')),
  resolutionFwhm: numeric(z.number({ message: 'must be a number' }).min(0.05, 'must be at least 0.05 Å').max(100, 'must be at most 100 Å')),
  candidateMinSnr: numeric(z.number({ message: 'must be a number' }).min(5, 'must be at least 5').max(1000, 'must be at most 1000')),
  notes: multiLine(2000),
}

const ordered = (v: { wavelengthMin?: number | null | undefined; wavelengthMax?: number | null | undefined }) => v.wavelengthMin == null || v.wavelengthMax == null || v.wavelengthMin < v.wavelengthMax
const orderedMessage = { message: 'the coverage must start below where it ends', path: ['wavelengthMax'] }

export const CreateInstrumentInput = z
  .object({
    campaignId: numeric(z.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })),
    name: rules.name,
    resolutionFwhm: rules.resolutionFwhm.nullable().optional(),
    wavelengthMin: edge.nullable().optional(),
    wavelengthMax: edge.nullable().optional(),
    candidateMinSnr: rules.candidateMinSnr.optional(),
    notes: rules.notes.optional(),
  })
  .refine(ordered, orderedMessage)
export type CreateInstrumentInput = z.infer<typeof CreateInstrumentInput>

/** Absent leaves a value as it is; null clears it. */
export const UpdateInstrumentInput = z
  .object({
    name: rules.name.optional(),
    resolutionFwhm: rules.resolutionFwhm.nullable().optional(),
    wavelengthMin: edge.nullable().optional(),
    wavelengthMax: edge.nullable().optional(),
    candidateMinSnr: rules.candidateMinSnr.optional(),
    notes: rules.notes.optional(),
  })
  .refine(ordered, orderedMessage)
export type UpdateInstrumentInput = z.infer<typeof UpdateInstrumentInput>

export const InstrumentListQuery = z.object({ campaign: z.coerce.number().int().positive().optional() })

/** Promote candidates: one or more spectra of the instrument, with the lead's note. */
export const PromoteInput = z.object({
  spectrumIds: z.array(numeric(z.number().int().positive()), { message: 'list the spectra to promote' }).min(1, 'choose at least one candidate').max(100, 'promote at most 100 at once'),
  note: multiLine(2000).default(''),
  name: singleLine(60).optional(),
})
export type PromoteInput = z.infer<typeof PromoteInput>

/** Demote standards of the instrument, saying why. */
export const DemoteInput = z.object({
  standardIds: z.array(numeric(z.number().int().positive()), { message: 'list the standards to demote' }).min(1, 'choose at least one standard').max(100, 'demote at most 100 at once'),
  note: multiLine(2000).pipe(z.string().min(1, 'is required: say why these standards are demoted')),
  name: singleLine(60).optional(),
})
export type DemoteInput = z.infer<typeof DemoteInput>

const instrumentReply = z.object({ instrument: InstrumentSummary })

export const instrumentsApi = {
  list: endpoint({
    method: 'get',
    path: '/instruments',
    tag: 'Instruments',
    summary: "The instruments of the caller's campaigns, or of one campaign",
    query: InstrumentListQuery,
    response: z.object({ instruments: z.array(InstrumentSummary) }),
  }),
  create: endpoint({
    method: 'post',
    path: '/instruments',
    tag: 'Instruments',
    summary: 'Add an instrument to a campaign (leads)',
    body: CreateInstrumentInput,
    status: 201,
    response: instrumentReply,
  }),
  get: endpoint({ method: 'get', path: '/instruments/:id', tag: 'Instruments', summary: 'One instrument', params: idParams, response: instrumentReply }),
  update: endpoint({
    method: 'patch',
    path: '/instruments/:id',
    tag: 'Instruments',
    summary: "Change an instrument's name, resolution, coverage or candidate S/N (leads)",
    params: idParams,
    body: UpdateInstrumentInput,
    response: instrumentReply,
  }),
  candidates: endpoint({
    method: 'get',
    path: '/instruments/:id/candidates',
    tag: 'Instruments',
    summary: "Decided spectra of the instrument that fill gaps in its standards' coverage",
    params: idParams,
    response: InstrumentCandidates,
  }),
  promote: endpoint({
    method: 'post',
    path: '/instruments/:id/promote',
    tag: 'Instruments',
    summary: "Promote candidates as the instrument's standards; publishes a new active library version (leads)",
    params: idParams,
    body: PromoteInput,
    status: 201,
    response: LibraryChange,
  }),
  demote: endpoint({
    method: 'post',
    path: '/instruments/:id/demote',
    tag: 'Instruments',
    summary: 'Demote standards of the instrument; publishes a new active library version without them (leads)',
    params: idParams,
    body: DemoteInput,
    status: 201,
    response: LibraryChange,
  }),
}
