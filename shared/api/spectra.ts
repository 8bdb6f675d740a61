import { z } from 'zod'
import { parseDeclination, parseRightAscension } from '../coords'
import { SPECTRUM_STATUSES } from '../status'
import { CampaignRef, PersonRef, campaignRef, idParams, multiLine, numeric, paging, singleLine } from './common'
import { ErrorBody, MessageReply, binaryBody, endpoint } from './endpoint'
import { SpectrumMeasurements } from './measurements'
import { FinalClassification } from './review'
import { SpectrumSuggestions } from './suggestions'

export const SpectrumFormat = z.enum(['fits-image', 'fits-table', 'text'])
export type SpectrumFormat = z.infer<typeof SpectrumFormat>

export const HeaderValue = z.union([z.string(), z.number(), z.boolean()])
export type HeaderValue = z.infer<typeof HeaderValue>

/** One HDU that holds a spectrum, as listed in {@link ReadMeta.hdus}. */
export const SpectrumHdu = z.object({ index: z.number().int(), name: z.string().optional(), kind: z.enum(['image', 'table']) })
export type SpectrumHdu = z.infer<typeof SpectrumHdu>

/** A pixel mask the reader applied, with the convention it followed. */
export const ReadMask = z.object({
  /** Where the flags came from, e.g. "DATAQUAL column", "DQ extension", "IVAR = 0". */
  source: z.string(),
  /** The convention applied and why, e.g. "0 = bad (the column comment says 1=good, 0=bad)". */
  rule: z.string(),
  /** Pixels it flagged. */
  pixels: z.number().int(),
})
export type ReadMask = z.infer<typeof ReadMask>

/** The reader's decisions, shown with the upload result and on the spectrum page. */
export const ReadDecisions = z
  .object({
    /** Where the spectrum came from, e.g. "HDU 2 (BLUE), image" or "text table, 2 columns". */
    source: z.string(),
    /** HDU read and why (FITS only). */
    hdu: z.object({ index: z.number().int(), name: z.string().optional(), why: z.string() }).optional(),
    /** Aperture, order or row read when the file holds several (or "merged" for echelle orders). */
    aperture: z.object({ number: z.union([z.number(), z.literal('merged')]), of: z.number().int(), why: z.string() }).optional(),
    /** How the wavelengths were obtained, e.g. "linear: CRVAL1 + CDELT1 (p − CRPIX1)". */
    wavelengthSolution: z.string(),
    /** Unit of the file's wavelengths and where it came from. */
    unit: z.object({ unit: z.string(), why: z.string() }),
    /** Air or vacuum, why, and what contradicted it. */
    medium: z.object({ vacuum: z.boolean(), why: z.string(), conflict: z.string().optional() }),
    /** Where the 1σ errors came from, when there are any. */
    errors: z.string().optional(),
    masks: z.array(ReadMask),
    /** Parts of the file not used, each with why. */
    ignored: z.array(z.string()),
    /** What the observer should check (contradictions, masks not applied, merged orders). */
    warnings: z.array(z.string()),
  })
  .meta({ id: 'ReadDecisions' })
export type ReadDecisions = z.infer<typeof ReadDecisions>

/** What the reader learned from the file. */
export const ReadMeta = z
  .object({
    format: SpectrumFormat,
    /** HDU the spectrum came from (FITS only). */
    hdu: z.number().int().optional(),
    /** Every HDU that holds a spectrum (FITS only), so a user can pick another. */
    hdus: z.array(SpectrumHdu).optional(),
    /** True when the file's wavelengths were vacuum and have been turned into air. */
    vacuumConverted: z.boolean(),
    /** Where the air/vacuum decision came from, e.g. "CTYPE1 = 'WAVE'" or "user's choice". */
    vacuumSource: z.string(),
    /** Wavelength unit as the file gave it, or "Angstrom (assumed)". */
    wavelengthUnit: z.string(),
    fluxUnit: z.string().optional(),
    /** Observation keywords kept as the file has them (OBJECT, RA, DEC, DATE-OBS, EXPTIME, …). */
    header: z.record(z.string(), HeaderValue),
    pixels: z.number().int(),
    /** Pixels flagged in `mask`. */
    maskedPixels: z.number().int(),
    /** Fraction of the classification region spanned by valid pixels. */
    coverage: z.number(),
    /** True when the file stored wavelengths in descending order and they were reversed. */
    reversed: z.boolean(),
    /** Things a person may want to know (e.g. "read the first of 2 rows"). */
    notes: z.array(z.string()),
    /** The reader's decisions (absent on spectra read before they were recorded). */
    decisions: ReadDecisions.optional(),
  })
  .meta({ id: 'ReadMeta' })
export type ReadMeta = z.infer<typeof ReadMeta>

/** How the observer asked for a file to be read; every field is optional ("as the file says"). */
export const ReadChoices = z.object({
  medium: z.enum(['air', 'vacuum']).optional(),
  /** Wavelength unit to use instead of the file's, e.g. "nm". */
  unit: z.string().optional(),
  hdu: z.number().int().optional(),
  /** Aperture, order or row, counted from 1. */
  aperture: z.number().int().optional(),
})
export type ReadChoices = z.infer<typeof ReadChoices>

/** One row of GET /api/spectra. */
export const SpectrumListItem = z
  .object({
    id: z.number().int(),
    objectName: z.string(),
    status: z.enum(SPECTRUM_STATUSES),
    statusReason: z.string().nullable(),
    campaign: CampaignRef,
    submittedBy: PersonRef,
    fileName: z.string(),
    obsDate: z.string().nullable(),
    createdAt: z.string(),
    snr: z.number().nullable(),
    pixels: z.number().int(),
    wavelengthRange: z.tuple([z.number(), z.number()]),
    dispersion: z.number(),
    raDeg: z.number().nullable(),
    decDeg: z.number().nullable(),
    /** The decided classification (agreed, settled or an accepted suggestion), when there is one. */
    classification: FinalClassification.nullable(),
  })
  .meta({ id: 'SpectrumListItem' })
export type SpectrumListItem = z.infer<typeof SpectrumListItem>

export const SpectrumList = z.object({ items: z.array(SpectrumListItem), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() }).meta({ id: 'SpectrumList' })
export type SpectrumList = z.infer<typeof SpectrumList>

export const SpectrumDetail = SpectrumListItem.extend({
  /** The instrument setup as the observer or the file header wrote it. */
  instrument: z.string(),
  /** The campaign's instrument record it was taken with. */
  instrumentRecord: z.object({ id: z.number().int(), name: z.string(), resolutionFwhm: z.number().nullable() }).nullable(),
  exposureS: z.number().nullable(),
  resolutionFwhm: z.number().nullable(),
  resolvingPower: z.number().nullable(),
  vMag: z.number().nullable(),
  parallaxMas: z.number().nullable(),
  parallaxErrorMas: z.number().nullable(),
  ebv: z.number().nullable(),
  notes: z.string(),
  format: z.string(),
  fileSize: z.number().int(),
  fileSha256: z.string(),
  vacuumConverted: z.boolean(),
  read: ReadMeta,
  /** How the observer asked for the file to be read. */
  readChoices: ReadChoices,
  canEdit: z.boolean(),
  /** The submitter, before any call. */
  canWithdraw: z.boolean(),
  /** Whether reading choices and resolution may be changed (re-read and re-process): the submitter before any call, or a lead. */
  canReread: z.boolean(),
}).meta({ id: 'SpectrumDetail' })
export type SpectrumDetail = z.infer<typeof SpectrumDetail>

/** GET /api/spectra/:id: the spectrum with its measurements and the suggestions the caller may see. */
export const SpectrumPage = z.object({ spectrum: SpectrumDetail, measurements: SpectrumMeasurements, suggestions: SpectrumSuggestions }).meta({ id: 'SpectrumPage' })
export type SpectrumPage = z.infer<typeof SpectrumPage>

/** The outcome for one uploaded file (zip archives give one per entry). */
export const FileResult = z
  .discriminatedUnion('outcome', [
    z.object({
      file: z.string(),
      outcome: z.literal('accepted'),
      spectrumId: z.number().int(),
      pixels: z.number().int(),
      wavelengthRange: z.tuple([z.number(), z.number()]),
      dispersion: z.number(),
      snr: z.number().nullable(),
      objectName: z.string(),
      notes: z.array(z.string()),
      decisions: ReadDecisions,
    }),
    z.object({ file: z.string(), outcome: z.literal('duplicate'), spectrumId: z.number().int().nullable(), message: z.string() }),
    z.object({ file: z.string(), outcome: z.literal('refused'), code: z.string(), message: z.string() }),
  ])
  .meta({ id: 'FileResult' })
export type FileResult = z.infer<typeof FileResult>

export const SubmitReply = z.object({ results: z.array(FileResult), accepted: z.number().int(), refused: z.number().int() }).meta({ id: 'SubmitReply' })
export type SubmitReply = z.infer<typeof SubmitReply>

// ------------------------------------------------------------------------------------------------
// Requests
// ------------------------------------------------------------------------------------------------

/**
 * An optional number: absent or '' leaves the stored value alone, null clears it (a JSON PATCH can say
 * "no V magnitude" that way; multipart forms never send null, so on upload it only means "not given").
 */
const optionalNumber = (min: number, max: number, what: string) =>
  z.preprocess(
    (v) => (v === '' || v === undefined ? undefined : v),
    numeric(z.number({ message: `must be a number` }).min(min, `${what} must be at least ${min}`).max(max, `${what} must be at most ${max}`))
      .nullable()
      .optional(),
  )
const optionalText = (max: number, text = singleLine) => z.preprocess((v) => (v === null ? undefined : v), text(max).optional())
const ra = z
  .string()
  .trim()
  .max(40)
  .refine((v) => v === '' || parseRightAscension(v).ok, { message: 'must be hh:mm:ss or degrees (0–360)' })
const dec = z
  .string()
  .trim()
  .max(40)
  .refine((v) => v === '' || parseDeclination(v).ok, { message: 'must be ±dd:mm:ss or degrees (−90…+90)' })
const date = z
  .string()
  .trim()
  .max(40)
  .refine((v) => v === '' || !Number.isNaN(Date.parse(v)), { message: 'must be a date, e.g. 2026-03-14T02:10:00' })

/** What an observer can say about a spectrum, on upload or later. */
export const SpectrumMetadataInput = z.object({
  objectName: optionalText(120),
  ra: ra.optional(),
  dec: dec.optional(),
  obsDate: date.optional(),
  instrument: optionalText(160),
  /** The campaign's instrument record; null takes the spectrum off any. */
  instrumentId: z.preprocess(
    (v) => (v === '' ? undefined : v),
    numeric(z.number({ message: 'must be an instrument id' }).int().positive({ message: 'must be an instrument id' }))
      .nullable()
      .optional(),
  ),
  resolutionFwhm: optionalNumber(0.01, 100, 'resolution FWHM (Å)'),
  resolvingPower: optionalNumber(10, 1_000_000, 'resolving power'),
  vMag: optionalNumber(-2, 30, 'V magnitude'),
  parallaxMas: optionalNumber(-100, 1000, 'parallax (mas)'),
  parallaxErrorMas: optionalNumber(0, 1000, 'parallax error (mas)'),
  ebv: optionalNumber(0, 5, 'E(B−V)'),
  notes: optionalText(2000, multiLine),
})
export type SpectrumMetadataInput = z.infer<typeof SpectrumMetadataInput>

/** Wavelength units an observer can choose instead of the file's ('file': as the file says). */
export const WAVELENGTH_UNIT_CHOICES = ['file', 'Angstrom', 'nm', 'um', 'm'] as const
export type WavelengthUnitChoice = (typeof WAVELENGTH_UNIT_CHOICES)[number]
export const WAVELENGTH_MEDIUM_CHOICES = ['file', 'air', 'vacuum'] as const
const medium = z.enum(WAVELENGTH_MEDIUM_CHOICES, { message: "must be 'file', 'air' or 'vacuum'" })
const unit = z.enum(WAVELENGTH_UNIT_CHOICES, { message: `must be one of ${WAVELENGTH_UNIT_CHOICES.join(', ')}` })
const hdu = numeric(z.number({ message: 'must be a number' }).int().min(0, 'HDU must be at least 0').max(999, 'HDU must be at most 999'))
const aperture = numeric(z.number({ message: 'must be a number' }).int().min(1, 'apertures are counted from 1').max(1000, 'aperture must be at most 1000'))
const blankToUndefined = (v: unknown) => (v === '' ? undefined : v)

/** The text fields of the multipart upload: the batch's details, and how its files are to be read. */
export const SubmitFields = SpectrumMetadataInput.extend({
  campaignId: numeric(z.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })),
  batchId: z.string().uuid().optional(),
  wavelengthMedium: medium.default('file'),
  wavelengthUnit: z.preprocess(blankToUndefined, unit.default('file')),
  hdu: z.preprocess(blankToUndefined, hdu.optional()),
  aperture: z.preprocess(blankToUndefined, aperture.optional()),
})
export type SubmitFields = z.infer<typeof SubmitFields>

/** A correction: the details, and how the stored file is to be read (null: as the file says / automatic). */
export const SpectrumCorrectionInput = SpectrumMetadataInput.extend({
  wavelengthMedium: medium.optional(),
  wavelengthUnit: unit.optional(),
  hdu: hdu.nullable().optional(),
  aperture: aperture.nullable().optional(),
})
export type SpectrumCorrectionInput = z.infer<typeof SpectrumCorrectionInput>

export const SPECTRUM_SORT_FIELDS = ['createdAt', 'objectName', 'snr', 'status', 'obsDate', 'id'] as const
export type SpectrumSortField = (typeof SPECTRUM_SORT_FIELDS)[number]
export type SpectrumSort = SpectrumSortField | `-${SpectrumSortField}`

export const SpectrumListQuery = z.object({
  ...paging,
  status: z.enum(SPECTRUM_STATUSES).optional(),
  campaign: z.coerce.number().int().positive().optional(),
  /** Spectra of one of the campaign's instruments. */
  instrument: z.coerce.number().int().positive().optional(),
  /** Part of the object or file name. */
  q: z.string().trim().max(120).optional(),
  /** Submitted from / up to (dates). */
  from: date.optional(),
  to: date.optional(),
  snrMin: z.coerce.number().optional(),
  snrMax: z.coerce.number().optional(),
  mine: z.enum(['1', '0']).optional(),
  sort: z
    .string()
    .regex(new RegExp(`^-?(${SPECTRUM_SORT_FIELDS.join('|')})$`), `sort by one of ${SPECTRUM_SORT_FIELDS.join(', ')}, with - for descending`)
    .default('-createdAt')
    .transform((v) => v as SpectrumSort),
})
export type SpectrumListQuery = z.infer<typeof SpectrumListQuery>

/** A wavelength window of a series and the most points to send. */
export const SeriesQuery = z.object({
  from: z.coerce.number().positive().optional(),
  to: z.coerce.number().positive().optional(),
  maxPoints: z.coerce.number().int().min(10).max(200_000).default(4000),
})
export type SeriesQuery = z.infer<typeof SeriesQuery>

/** Files of a campaign the server already holds, by SHA-256 (a pipeline resuming a batch skips them). */
export const KnownFilesInput = z.object({ campaignId: campaignRef, sha256: z.array(z.string().regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in hex')).max(5000) })
export type KnownFilesInput = z.infer<typeof KnownFilesInput>
export const KnownFiles = z.object({ known: z.array(z.object({ sha256: z.string(), spectrumId: z.number().int().nullable() })) }).meta({ id: 'KnownFiles' })
export type KnownFiles = z.infer<typeof KnownFiles>

const SERIES = binaryBody('application/octet-stream', 'A binary series: a JSON header line, then little-endian Float32 columns (see server/lib/series.ts).')

export const spectraApi = {
  submit: endpoint({
    method: 'post',
    path: '/spectra',
    tag: 'Spectra',
    summary: 'Upload spectra (multipart: the fields below and one or more `files`; zip archives are unpacked)',
    description: 'Each file is read, stored and queued for processing on its own; one bad file never fails the batch. A file already in the campaign (same SHA-256) is reported as a duplicate.',
    multipart: true,
    body: SubmitFields,
    response: SubmitReply,
    otherResponses: {
      422: {
        description: 'Fields not valid, or no files sent (then the reply also carries the empty per-file results).',
        schema: z.union([ErrorBody, SubmitReply.extend({ error: z.object({ code: z.literal('no_files'), message: z.string(), details: z.null() }) })]),
      },
    },
  }),
  known: endpoint({ method: 'post', path: '/spectra/known', tag: 'Spectra', summary: 'Which of these files (by SHA-256) the campaign already holds', body: KnownFilesInput, response: KnownFiles }),
  list: endpoint({ method: 'get', path: '/spectra', tag: 'Spectra', summary: 'Spectra the caller may see, a page at a time', query: SpectrumListQuery, response: SpectrumList }),
  get: endpoint({
    method: 'get',
    path: '/spectra/:id',
    tag: 'Spectra',
    summary: 'One spectrum with its measurements and the suggestions the caller may see',
    params: idParams,
    response: SpectrumPage,
  }),
  process: endpoint({ method: 'post', path: '/spectra/:id/process', tag: 'Spectra', summary: 'Process the spectrum again', params: idParams, status: 202, response: MessageReply }),
  prepared: endpoint({
    method: 'get',
    path: '/spectra/:id/prepared',
    tag: 'Spectra',
    summary: 'The prepared spectrum on the library grid: wavelength, flux, continuum, rectified',
    params: idParams,
    query: SeriesQuery,
    response: SERIES,
  }),
  update: endpoint({
    method: 'patch',
    path: '/spectra/:id',
    tag: 'Spectra',
    summary: 'Correct the details or how the stored file is read (re-reads and re-processes)',
    params: idParams,
    body: SpectrumCorrectionInput,
    response: z.object({ spectrum: SpectrumDetail }),
  }),
  withdraw: endpoint({ method: 'delete', path: '/spectra/:id', tag: 'Spectra', summary: 'Withdraw one’s own spectrum before any call', params: idParams, response: MessageReply }),
  data: endpoint({
    method: 'get',
    path: '/spectra/:id/data',
    tag: 'Spectra',
    summary: 'The observed spectrum (wavelength, flux[, error]) in a window',
    params: idParams,
    query: SeriesQuery,
    response: SERIES,
  }),
  file: endpoint({
    method: 'get',
    path: '/spectra/:id/file',
    tag: 'Spectra',
    summary: 'The file as it was uploaded',
    params: idParams,
    response: binaryBody('application/octet-stream', 'The uploaded file, byte for byte.'),
  }),
}
