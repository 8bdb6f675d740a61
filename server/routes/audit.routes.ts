import { auditApi } from '../../shared/api/audit'
import { getAuditJson } from '../services/audit.service'
import { JsonText, LEAD, route } from './route'

export function auditRoutes() {
  // Already JSON: the report is written where it is made, off this thread.
  return [route(auditApi.report, { access: LEAD, handler: async ({ query }) => new JsonText(await getAuditJson(query)) })]
}
