import { z } from 'zod'
import { OPTICAL_LIMITS } from '../spectra/io/finalize'
import { multiLine, numeric, singleLine } from './common'

const edge = numeric(z.number({ message: 'must be a number' }).min(OPTICAL_LIMITS[0], `must be at least ${OPTICAL_LIMITS[0]} Å`).max(OPTICAL_LIMITS[1], `must be at most ${OPTICAL_LIMITS[1]} Å`))

const rules = {
  name: singleLine(120).pipe(z.string().min(1, 'is required')),
  resolutionFwhm: numeric(z.number({ message: 'must be a number' }).min(0.05, 'must be at least 0.05 Å').max(100, 'must be at most 100 Å')),
  wavelengthMin: edge,
  wavelengthMax: edge,
  candidateMinSnr: numeric(z.number({ message: 'must be a number' }).min(5, 'must be at least 5').max(1000, 'must be at most 1000')),
  notes: multiLine(2000),
}

const ordered = (v: { wavelengthMin?: number | null; wavelengthMax?: number | null }) => v.wavelengthMin == null || v.wavelengthMax == null || v.wavelengthMin < v.wavelengthMax
const orderedMessage = { message: 'the coverage must start below where it ends', path: ['wavelengthMax'] }

export const createInstrumentBody = z
  .object({
    campaignId: numeric(z.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })),
    name: rules.name,
    resolutionFwhm: rules.resolutionFwhm.nullable().optional(),
    wavelengthMin: rules.wavelengthMin.nullable().optional(),
    wavelengthMax: rules.wavelengthMax.nullable().optional(),
    candidateMinSnr: rules.candidateMinSnr.optional(),
    notes: rules.notes.optional(),
  })
  .refine(ordered, orderedMessage)
export type CreateInstrumentInput = z.infer<typeof createInstrumentBody>

/** Absent leaves a value as it is; null clears it. */
export const updateInstrumentBody = z
  .object({
    name: rules.name.optional(),
    resolutionFwhm: rules.resolutionFwhm.nullable().optional(),
    wavelengthMin: rules.wavelengthMin.nullable().optional(),
    wavelengthMax: rules.wavelengthMax.nullable().optional(),
    candidateMinSnr: rules.candidateMinSnr.optional(),
    notes: rules.notes.optional(),
  })
  .refine(ordered, orderedMessage)
export type UpdateInstrumentInput = z.infer<typeof updateInstrumentBody>

export const instrumentListQuery = z.object({
  campaign: z.coerce.number().int().positive().optional(),
})

/** Promote candidates: one or more spectra of the instrument, with the lead's note. */
export const promoteBody = z.object({
  spectrumIds: z.array(numeric(z.number().int().positive()), { message: 'list the spectra to promote' }).min(1, 'choose at least one candidate').max(100, 'promote at most 100 at once'),
  note: multiLine(2000).default(''),
  name: singleLine(60).optional(),
})

/** Demote standards of the instrument, saying why. */
export const demoteBody = z.object({
  standardIds: z.array(numeric(z.number().int().positive()), { message: 'list the standards to demote' }).min(1, 'choose at least one standard').max(100, 'demote at most 100 at once'),
  note: multiLine(2000).pipe(z.string().min(1, 'is required: say why these standards are demoted')),
  name: singleLine(60).optional(),
})
