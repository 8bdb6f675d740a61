import { z } from 'zod'
import { idParams, multiLine, numeric, singleLine } from './common'
import { binaryBody, endpoint } from './endpoint'

export const StandardSource = z.enum(['model', 'observed'])
export type StandardSource = z.infer<typeof StandardSource>

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
  add: endpoint({ method: 'post', path: '/standards', tag: 'Standards', summary: 'Promote an uploaded spectrum to an observed standard', body: AddStandardInput, status: 201, response: z.object({ standard: StandardSummary }) }),
  publish: endpoint({ method: 'post', path: '/standards/versions', tag: 'Standards', summary: 'Publish the current standards as a new library version', body: PublishVersionInput, status: 201, response: z.object({ version: VersionSummary }) }),
  retire: endpoint({ method: 'post', path: '/standards/:id/retire', tag: 'Standards', summary: 'Retire a standard from future versions', params: idParams, response: z.object({ standard: StandardSummary }) }),
  data: endpoint({ method: 'get', path: '/standards/:id/data', tag: 'Standards', summary: "A standard's spectrum", params: idParams, response: binaryBody('application/octet-stream', 'A binary series: a JSON header line, then little-endian Float32 columns.') }),
  resuggest: endpoint({ method: 'post', path: '/campaigns/:id/resuggest', tag: 'Standards', summary: "Suggest again for every spectrum of a campaign with the active library", params: idParams, status: 202, response: ResuggestReply }),
}
