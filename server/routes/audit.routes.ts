import { auditQuery } from '../schemas/audit.schemas'
import { getAuditJson } from '../services/audit.service'
import { LEAD, defineRoutes } from './route'

export function auditRoutes() {
  return defineRoutes([
    {
      method: 'get',
      path: '/audit',
      access: LEAD,
      schema: { query: auditQuery },
      handler: async (_req, res) => {
        // Already JSON: the report is written where it is made, off this thread.
        res.type('application/json').send(await getAuditJson(res.locals.query))
      },
    },
  ])
}
