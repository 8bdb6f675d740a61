import { z } from 'zod'

export const addStandardBody = z.object({
  spectrumId: z.coerce.number().int().positive(),
  spectralType: z.string().trim().min(1, 'is required').max(30),
  luminosityClass: z.string().trim().min(1, 'is required').max(12),
  note: z.string().trim().min(1, 'is required: say where the classification comes from').max(2000),
})

export const publishVersionBody = z.object({
  name: z.string().trim().min(1, 'is required').max(60),
  description: z.string().trim().max(5000).default(''),
})
