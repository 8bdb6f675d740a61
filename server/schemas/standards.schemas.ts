import { z } from 'zod'
import { multiLine, numeric, singleLine } from './common'

export const addStandardBody = z.object({
  spectrumId: numeric(z.number().int().positive()),
  spectralType: z.string().trim().min(1, 'is required').max(30),
  luminosityClass: z.string().trim().min(1, 'is required').max(12),
  note: multiLine(2000).pipe(z.string().min(1, 'is required: say where the classification comes from')),
})

export const publishVersionBody = z.object({
  name: singleLine(60).pipe(z.string().min(1, 'is required')),
  description: multiLine(5000).default(''),
})
