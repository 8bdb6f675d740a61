import { z } from 'zod'
import { PersonRef, idParams, multiLine, numeric, singleLine } from './common'
import { binaryBody, endpoint } from './endpoint'

export const StandardSource = z.enum(['model', 'observed'])
export type StandardSource = z.infer<typeof StandardSource>

/** How a spectrum came to be decided, as a candidate standard needs it. */
export const DecisionRecord = z.object({
  classificationId: z.number().int(),
  /** 'agreed': every call the same, by at least two classifiers; 'settled': a lead settled a dispute. */
  how: z.enum(['agreed', 'settled']),
  spectralType: z.string(),
  typeCode: z.number(),
  luminosityClass: z.string(),
  classCode: z.number(),
  decidedAt: z.string(),
  /** The lead who settled it; for an agreement, the classifier whose call completed it. */
  decidedBy: PersonRef.nullable(),
  /** The standing calls. */
  calls: z.array(z.object({ callId: z.number().int(), classifier: PersonRef, spectralType: z.string(), at: z.string() })),
})
export type DecisionRecord = z.infer<typeof DecisionRecord>

const InstrumentRef = z.object({ id: z.number().int(), name: z.string() })

/** Where a standard promoted from a team's agreed spectrum comes from. */
export const StandardProvenance = z.object({
  instrument: InstrumentRef,
  spectrumId: z.number().int(),
  objectName: z.string(),
  snr: z.number(),
  /** Who decided, how, the calls and the date. */
  decision: DecisionRecord,
  /** The gap in the instrument's type × class coverage it filled, e.g. "K0 III". */
  gap: z.string(),
  promotedBy: PersonRef,
  promotedAt: z.string(),
})
export type StandardProvenance = z.infer<typeof StandardProvenance>

/** What a promotion or a demotion changed, and why; kept with the version it published. */
export const VersionChanges = z.object({
  action: z.enum(['promote', 'demote']),
  instrument: InstrumentRef,
  /** The lead's note. */
  note: z.string(),
  standards: z.array(z.object({ standardId: z.number().int(), spectrumId: z.number().int().nullable(), spectralType: z.string(), reason: z.string() })),
})
export type VersionChanges = z.infer<typeof VersionChanges>

export const StandardSummary = z
  .object({
    id: z.number().int(),
    source: StandardSource,
    modelId: z.string().nullable(),
    /** Id in the shipped observed library, e.g. "miles-0892". */
    templateId: z.string().nullable(),
    /** Star name and the library it comes from (shipped observed standards). */
    star: z.string().nullable(),
    origin: z.string().nullable(),
    /** The uploaded spectrum behind an observed standard. */
    spectrumId: z.number().int().nullable(),
    /** MK notation with the class, e.g. "B5 IV". */
    spectralType: z.string(),
    typeCode: z.number(),
    luminosityClass: z.string(),
    classCode: z.number(),
    teff: z.number().nullable(),
    logg: z.number().nullable(),
    feh: z.number().nullable(),
    /** Resolution of the standard's spectrum, FWHM Å, when known. */
    resolutionFwhm: z.number().nullable(),
    note: z.string(),
    addedBy: z.number().int().nullable(),
    retiredAt: z.string().nullable(),
    createdAt: z.string(),
    /** Ids of the versions that hold this standard. */
    versionIds: z.array(z.number().int()),
    /** The instrument it was promoted for; null for standards every spectrum is matched against. */
    instrumentId: z.number().int().nullable(),
    /** Who decided it and how, for a standard promoted from an agreed spectrum. */
    provenance: StandardProvenance.nullable(),
  })
  .meta({ id: 'StandardSummary' })
export type StandardSummary = z.infer<typeof StandardSummary>

/** A published (or draft) set of standards; suggestions record which one made them. */
export const VersionSummary = z
  .object({
    id: z.number().int(),
    name: z.string(),
    description: z.string(),
    status: z.enum(['draft', 'published']),
    isActive: z.boolean(),
    publishedAt: z.string().nullable(),
    /** User id of the lead who published it; null for the library shipped with Lineweight. */
    publishedBy: z.number().int().nullable(),
    standardCount: z.number().int(),
    /** The instrument whose standards a promotion or demotion changed. */
    instrumentId: z.number().int().nullable(),
    /** The version it was made from by a promotion or demotion. */
    basedOnId: z.number().int().nullable(),
    changes: VersionChanges.nullable(),
  })
  .meta({ id: 'VersionSummary' })
export type VersionSummary = z.infer<typeof VersionSummary>

/** GET /api/standards: every version and every standard (without arrays), and which version is active. */
export const StandardsLibrary = z.object({ activeVersionId: z.number().int().nullable(), versions: z.array(VersionSummary), standards: z.array(StandardSummary) }).meta({ id: 'StandardsLibrary' })
export type StandardsLibrary = z.infer<typeof StandardsLibrary>

export const AddStandardInput = z.object({
  spectrumId: numeric(z.number().int().positive()),
  /** Spectral type, e.g. "A0" (a class written here must agree with `luminosityClass`). */
  spectralType: z.string().trim().min(1, 'is required').max(30),
  luminosityClass: z.string().trim().min(1, 'is required').max(12),
  /** Where the classification comes from. */
  note: multiLine(2000).pipe(z.string().min(1, 'is required: say where the classification comes from')),
})
export type AddStandardInput = z.infer<typeof AddStandardInput>

export const PublishVersionInput = z.object({ name: singleLine(60).pipe(z.string().min(1, 'is required')), description: multiLine(5000).default('') })
export type PublishVersionInput = z.infer<typeof PublishVersionInput>

export const ResuggestReply = z.object({ queued: z.number().int(), skipped: z.number().int(), libraryVersionId: z.number().int() })
export type ResuggestReply = z.infer<typeof ResuggestReply>

export const standardsApi = {
  library: endpoint({ method: 'get', path: '/standards', tag: 'Standards', summary: 'Every library version and standard, and which version is active', response: StandardsLibrary }),
  add: endpoint({
    method: 'post',
    path: '/standards',
    tag: 'Standards',
    summary: 'Promote an uploaded spectrum to an observed standard',
    body: AddStandardInput,
    status: 201,
    response: z.object({ standard: StandardSummary }),
  }),
  publish: endpoint({
    method: 'post',
    path: '/standards/versions',
    tag: 'Standards',
    summary: 'Publish the current standards as a new library version',
    body: PublishVersionInput,
    status: 201,
    response: z.object({ version: VersionSummary }),
  }),
  retire: endpoint({
    method: 'post',
    path: '/standards/:id/retire',
    tag: 'Standards',
    summary: 'Retire a standard from future versions',
    params: idParams,
    response: z.object({ standard: StandardSummary }),
  }),
  data: endpoint({
    method: 'get',
    path: '/standards/:id/data',
    tag: 'Standards',
    summary: "A standard's spectrum",
    params: idParams,
    response: binaryBody('application/octet-stream', 'A binary series: a JSON header line, then little-endian Float32 columns.'),
  }),
  resuggest: endpoint({
    method: 'post',
    path: '/campaigns/:id/resuggest',
    tag: 'Standards',
    summary: 'Suggest again for every spectrum of a campaign with the active library',
    params: idParams,
    status: 202,
    response: ResuggestReply,
  }),
}
