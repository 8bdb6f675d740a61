import { auditApi } from '../../shared/api/audit'
import { getAuditReply } from '../services/audit.service'
import { JsonText, LEAD, route } from './route'

export function auditRoutes() {
  // Already JSON: the report is written where it is made, off this thread.
  return [
    route(auditApi.report, {
      access: LEAD,
      handler: async ({ query }) => {
        const reply = await getAuditReply(query)
        return new JsonText(reply.body, reply.etag)
      },
    }),
  ]
}
