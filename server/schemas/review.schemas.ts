import { z } from 'zod'
import { parseMK } from '../../shared/mk'
import { multiLine } from './common'

const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v)

/** A type bound as a type code (18) or as MK text ("B8"). */
const typeBound = z.preprocess(
  emptyToUndefined,
  z
    .union([z.coerce.number().min(0).max(99.99), z.string().trim()])
    .transform((v, ctx) => {
      if (typeof v === 'number') return v
      const r = parseMK(v)
      if (r.ok && r.value.typeCode !== undefined) return r.value.typeCode
      ctx.addIssue({ code: 'custom', message: 'must be a spectral type such as B0 or a type code such as 10' })
      return z.NEVER
    })
    .optional(),
)

export const queueQuery = z.object({
  campaign: z.preprocess(emptyToUndefined, z.coerce.number().int().positive().optional()),
  flags: z.preprocess(
    emptyToUndefined,
    z
      .string()
      .max(400)
      .transform((v) => v.split(',').map((f) => f.trim()).filter(Boolean))
      .optional(),
  ),
  typeFrom: typeBound,
  typeTo: typeBound,
  snrMin: z.preprocess(emptyToUndefined, z.coerce.number().optional()),
  snrMax: z.preprocess(emptyToUndefined, z.coerce.number().optional()),
  order: z.enum(['oldest', 'snr', 'flagged']).default('oldest'),
  limit: z.coerce.number().int().min(1).max(500).default(200),
})

export const nextQuery = queueQuery.extend({
  after: z.preprocess(emptyToUndefined, z.coerce.number().int().positive().optional()),
})

export const spectrumIdParams = z.object({ spectrumId: z.coerce.number().int().positive() })

const mkText = (max: number) => z.string().trim().min(1, 'is required').max(max)

export const callBody = z
  .object({
    spectralType: mkText(40).optional(),
    luminosityClass: mkText(12).optional(),
    peculiarities: z.string().trim().max(60).optional(),
    notes: multiLine(4000).default(''),
    confidence: z.number().int('must be 1, 2 or 3').min(1, 'must be 1, 2 or 3').max(3, 'must be 1, 2 or 3'),
    uncertain: z.boolean().default(false),
    acceptedSuggestion: z.boolean().default(false),
    secondsSpent: z.number().int().min(0).max(86_400).optional(),
    correctsCallId: z.number().int().positive().optional(),
  })
  .strict()
  .refine((v) => v.acceptedSuggestion || (v.spectralType !== undefined && v.luminosityClass !== undefined), {
    message: 'give a spectral type and a luminosity class, or accept the suggestion',
    path: ['spectralType'],
  })

export const settleBody = z.object({
  spectralType: mkText(40),
  luminosityClass: mkText(12),
  peculiarities: z.string().trim().max(60).optional(),
  note: multiLine(4000).pipe(z.string().min(1, 'say why you settled it this way')),
})

export const disputesQuery = z.object({
  state: z.enum(['open', 'settled', 'another-call', 'reopened', 'all']).default('all'),
  campaign: z.preprocess(emptyToUndefined, z.coerce.number().int().positive().optional()),
})

export const disputeActionBody = z.object({
  action: z.enum(['another-call', 'reopened']),
  note: z.string().trim().min(1, 'say why').max(4000),
})
