import { z } from 'zod'
import { EXPORT_FORMATS } from '../exports'
import { multiLine, numeric, singleLine } from './common'
import { paging } from './paging'

const title = singleLine(200).pipe(z.string().min(1, 'is required'))
const description = multiLine(5000).default('')

const authors = z.string().trim().max(500, 'must be at most 500 characters').default('')
const includeDecider = z.boolean().default(true)

export const createReleaseBody = z.object({
  campaignId: numeric(z.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })),
  title,
  description,
  authors,
  includeDecider,
})

export const supersedeReleaseBody = z.object({ title, description, authors, includeDecider })

export const previewReleaseQuery = z.object({
  campaign: z.coerce.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' }),
  includeDecider: z.enum(['true', 'false']).default('true').transform((v) => v === 'true'),
})

export const listReleasesQuery = z.object({
  campaign: z.preprocess((v) => (v === '' ? undefined : v), z.coerce.number().int().positive().optional()),
})

export const releaseRowsQuery = z.object(paging)

export const downloadQuery = z.object({
  format: z.enum(EXPORT_FORMATS, { message: `must be one of ${EXPORT_FORMATS.join(', ')}` }),
})
