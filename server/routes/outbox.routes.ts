import { outboxApi } from '../../shared/api/outbox'
import { getMail, listMail } from '../services/outbox.service'
import { LEAD, route } from './route'

export function outboxRoutes() {
  return [
    route(outboxApi.list, { access: LEAD, handler: ({ query }) => listMail(query.page, query.pageSize) }),
    route(outboxApi.get, { access: LEAD, handler: async ({ params }) => ({ mail: await getMail(params.id) }) }),
  ]
}
