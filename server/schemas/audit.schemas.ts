import { z } from 'zod'

const DATE_ONLY = /^\d{4}-\d\d-\d\d$/

/** A date or a date-time; a bare date means the start of that UTC day. */
const when = z
  .string()
  .trim()
  .max(40)
  .refine((v) => !Number.isNaN(Date.parse(DATE_ONLY.test(v) ? `${v}T00:00:00Z` : v)), { message: 'must be a date, e.g. 2026-03-14' })

/** GET /api/audit?campaign=&from=&to= — `to` is inclusive: a bare date covers that whole day. */
export const auditQuery = z
  .object({
    campaign: z.coerce.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' }),
    from: when.optional(),
    to: when.optional(),
  })
  .transform((q) => ({
    campaignId: q.campaign,
    from: q.from ? new Date(DATE_ONLY.test(q.from) ? `${q.from}T00:00:00Z` : q.from) : undefined,
    to: q.to ? (DATE_ONLY.test(q.to) ? new Date(Date.parse(`${q.to}T00:00:00Z`) + 86_400_000) : new Date(q.to)) : undefined,
  }))
  .refine((q) => !q.from || !q.to || q.from < q.to, { message: 'must be after from', path: ['to'] })
