import { z } from 'zod'
import { endpoint } from './endpoint'

export const Health = z.object({ status: z.enum(['ok', 'degraded']), database: z.enum(['ok', 'unreachable']) })
export type Health = z.infer<typeof Health>

export const healthApi = {
  get: endpoint({
    method: 'get',
    path: '/health',
    tag: 'Service',
    summary: 'Whether the service and its database answer',
    response: Health,
    otherResponses: { 503: { description: 'The database does not answer (with Retry-After).', schema: Health } },
  }),
}
