import { z } from 'zod'
import { parseDeclination, parseRightAscension } from '../../shared/coords'
import { SPECTRUM_STATUSES } from '../../shared/status'
import { multiLine, numeric, singleLine } from './common'
import { paging } from './paging'

/**
 * An optional number: absent or '' leaves the stored value alone, null clears it (a JSON PATCH can say
 * "no V magnitude" that way; multipart forms never send null, so on upload it only means "not given").
 */
const optionalNumber = (min: number, max: number, what: string) =>
  z.preprocess(
    (v) => (v === '' || v === undefined ? undefined : v),
    numeric(z.number({ message: `must be a number` }).min(min, `${what} must be at least ${min}`).max(max, `${what} must be at most ${max}`)).nullable().optional(),
  )
const optionalText = (max: number, text = singleLine) => z.preprocess((v) => (v === null ? undefined : v), text(max).optional())
const ra = z.string().trim().max(40).refine((v) => v === '' || parseRightAscension(v).ok, { message: 'must be hh:mm:ss or degrees (0–360)' })
const dec = z.string().trim().max(40).refine((v) => v === '' || parseDeclination(v).ok, { message: 'must be ±dd:mm:ss or degrees (−90…+90)' })
const date = z.string().trim().max(40).refine((v) => v === '' || !Number.isNaN(Date.parse(v)), { message: 'must be a date, e.g. 2026-03-14T02:10:00' })

/** What an observer can say about a spectrum, on upload or later. */
export const spectrumMetadata = z.object({
  objectName: optionalText(120),
  ra: ra.optional(),
  dec: dec.optional(),
  obsDate: date.optional(),
  instrument: optionalText(160),
  /** The campaign's instrument record; null takes the spectrum off any. */
  instrumentId: z.preprocess((v) => (v === '' ? undefined : v), numeric(z.number({ message: 'must be an instrument id' }).int().positive({ message: 'must be an instrument id' })).nullable().optional()),
  resolutionFwhm: optionalNumber(0.01, 100, 'resolution FWHM (Å)'),
  resolvingPower: optionalNumber(10, 1_000_000, 'resolving power'),
  vMag: optionalNumber(-2, 30, 'V magnitude'),
  parallaxMas: optionalNumber(-100, 1000, 'parallax (mas)'),
  parallaxErrorMas: optionalNumber(0, 1000, 'parallax error (mas)'),
  ebv: optionalNumber(0, 5, 'E(B−V)'),
  notes: optionalText(2000, multiLine),
})
export type SpectrumMetadataInput = z.infer<typeof spectrumMetadata>

/** Wavelength units an observer can choose instead of the file's ('file': as the file says). */
export const WAVELENGTH_UNIT_CHOICES = ['file', 'Angstrom', 'nm', 'um', 'm'] as const
const medium = z.enum(['file', 'air', 'vacuum'], { message: "must be 'file', 'air' or 'vacuum'" })
const unit = z.enum(WAVELENGTH_UNIT_CHOICES, { message: `must be one of ${WAVELENGTH_UNIT_CHOICES.join(', ')}` })
const hdu = numeric(z.number({ message: 'must be a number' }).int().min(0, 'HDU must be at least 0').max(999, 'HDU must be at most 999'))
const aperture = numeric(z.number({ message: 'must be a number' }).int().min(1, 'apertures are counted from 1').max(1000, 'aperture must be at most 1000'))

export const submitBody = spectrumMetadata.extend({
  campaignId: numeric(z.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })),
  batchId: z.string().uuid().optional(),
  wavelengthMedium: medium.default('file'),
  wavelengthUnit: z.preprocess((v) => (v === '' ? undefined : v), unit.default('file')),
  hdu: z.preprocess((v) => (v === '' ? undefined : v), hdu.optional()),
  aperture: z.preprocess((v) => (v === '' ? undefined : v), aperture.optional()),
})

/** A correction: the details, and how the stored file is to be read (null: as the file says / automatic). */
export const spectrumCorrection = spectrumMetadata.extend({
  wavelengthMedium: medium.optional(),
  wavelengthUnit: unit.optional(),
  hdu: hdu.nullable().optional(),
  aperture: aperture.nullable().optional(),
})
export type SpectrumCorrectionInput = z.infer<typeof spectrumCorrection>

const sortable = ['createdAt', 'objectName', 'snr', 'status', 'obsDate', 'id'] as const
export const listQuery = z.object({
  ...paging,
  status: z.enum(SPECTRUM_STATUSES).optional(),
  campaign: z.coerce.number().int().positive().optional(),
  instrument: z.coerce.number().int().positive().optional(),
  q: z.string().trim().max(120).optional(),
  from: date.optional(),
  to: date.optional(),
  snrMin: z.coerce.number().optional(),
  snrMax: z.coerce.number().optional(),
  mine: z.enum(['1', '0']).optional(),
  sort: z
    .string()
    .regex(new RegExp(`^-?(${sortable.join('|')})$`), `sort by one of ${sortable.join(', ')}, with - for descending`)
    .default('-createdAt'),
})

export const dataQuery = z.object({
  from: z.coerce.number().positive().optional(),
  to: z.coerce.number().positive().optional(),
  maxPoints: z.coerce.number().int().min(10).max(200_000).default(4000),
})
