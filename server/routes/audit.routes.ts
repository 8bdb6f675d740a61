import { auditApi } from '../../shared/api/audit'
import { getAudit } from '../services/audit.service'
import { LEAD, route } from './route'

export function auditRoutes() {
  return [route(auditApi.report, { access: LEAD, handler: async ({ query }) => ({ audit: await getAudit(query) }) })]
}
