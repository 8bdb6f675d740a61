import { auditQuery } from '../schemas/audit.schemas'
import { getAudit } from '../services/audit.service'
import { LEAD, defineRoutes } from './route'

export function auditRoutes() {
  return defineRoutes([
    {
      method: 'get',
      path: '/audit',
      access: LEAD,
      schema: { query: auditQuery },
      handler: async (_req, res) => {
        res.json({ audit: await getAudit(res.locals.query) })
      },
    },
  ])
}
