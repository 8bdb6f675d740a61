import { z } from 'zod'
import { OPTICAL_LIMITS } from '../spectra/io/finalize'
import { multiLine, singleLine } from './common'

/** The classification region a campaign may choose, Å: the optical range the readers accept. */
export const REGION_LIMITS = OPTICAL_LIMITS

const regionEdge = z.number().min(REGION_LIMITS[0], `must be at least ${REGION_LIMITS[0]} Å`).max(REGION_LIMITS[1], `must be at most ${REGION_LIMITS[1]} Å`)

const rules = {
  name: singleLine(160).pipe(z.string().min(1, 'is required')),
  description: multiLine(4000),
  observatory: singleLine(160),
  regionMin: regionEdge,
  regionMax: regionEdge,
  callsRequired: z.number().int('must be a whole number').min(1, 'must be 1, 2 or 3').max(3, 'must be 1, 2 or 3'),
  blindReview: z.boolean(),
  typeTolerance: z.number().min(0, 'must be 0 or more subtypes').max(10, 'must be at most 10 subtypes'),
  classTolerance: z.number().min(0, 'must be 0 or more classes').max(3, 'must be at most 3 classes'),
  deadline: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date, YYYY-MM-DD')
    .refine((d) => !Number.isNaN(Date.parse(`${d}T00:00:00Z`)) && new Date(`${d}T00:00:00Z`).toISOString().startsWith(d), 'is not a calendar date')
    .nullable(),
}

const regionOrdered = (v: { regionMin?: number; regionMax?: number }) => v.regionMin === undefined || v.regionMax === undefined || v.regionMin < v.regionMax
const regionMessage = { message: 'the region must start below where it ends', path: ['regionMax'] }

export const createCampaignBody = z
  .object({
    code: z.string().trim().regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,31}$/, 'letters, digits, - and _, at most 32'),
    name: rules.name,
    description: rules.description.default(''),
    observatory: rules.observatory.default(''),
    regionMin: rules.regionMin.optional(),
    regionMax: rules.regionMax.optional(),
    callsRequired: rules.callsRequired.default(1),
    blindReview: rules.blindReview.default(false),
    typeTolerance: rules.typeTolerance.default(1),
    classTolerance: rules.classTolerance.default(1),
    deadline: rules.deadline.default(null),
  })
  .refine(regionOrdered, regionMessage)
export type CreateCampaignInput = z.infer<typeof createCampaignBody>

export const updateCampaignBody = z
  .object({
    name: rules.name.optional(),
    description: rules.description.optional(),
    observatory: rules.observatory.optional(),
    regionMin: rules.regionMin.optional(),
    regionMax: rules.regionMax.optional(),
    callsRequired: rules.callsRequired.optional(),
    blindReview: rules.blindReview.optional(),
    typeTolerance: rules.typeTolerance.optional(),
    classTolerance: rules.classTolerance.optional(),
    deadline: rules.deadline.optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'nothing to change')
  .refine(regionOrdered, regionMessage)
export type UpdateCampaignInput = z.infer<typeof updateCampaignBody>

export const membersBody = z.object({ userIds: z.array(z.number().int().positive()).max(1000) })
export const memberBody = z.object({ userId: z.number().int().positive() })
export const memberParams = z.object({ id: z.coerce.number().int().positive(), userId: z.coerce.number().int().positive() })
