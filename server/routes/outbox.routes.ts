import { idParams } from '../schemas/common'
import { pagingQuery } from '../schemas/paging'
import { getMail, listMail } from '../services/outbox.service'
import { LEAD, defineRoutes } from './route'

export function outboxRoutes() {
  return defineRoutes([
    {
      method: 'get',
      path: '/outbox',
      access: LEAD,
      schema: { query: pagingQuery },
      handler: async (_req, res) => {
        res.json(await listMail(res.locals.query.page, res.locals.query.pageSize))
      },
    },
    {
      method: 'get',
      path: '/outbox/:id',
      access: LEAD,
      schema: { params: idParams },
      handler: async (_req, res) => {
        res.json({ mail: await getMail(res.locals.params.id) })
      },
    },
  ])
}
