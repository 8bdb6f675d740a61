import { instrumentsApi } from '../../shared/api/instruments'
import type { AppContext } from '../context'
import { createInstrument, getInstrument, listInstruments, updateInstrument } from '../services/instruments.service'
import { demoteStandards, instrumentCandidates, promoteCandidates } from '../services/promotion.service'
import { LEAD, STAFF, route } from './route'

export function instrumentRoutes(ctx: AppContext) {
  return [
    route(instrumentsApi.list, { access: 'signed-in', handler: async ({ query, user }) => ({ instruments: await listInstruments(user, query.campaign) }) }),
    route(instrumentsApi.create, { access: LEAD, handler: async ({ body, user }) => ({ instrument: await createInstrument(user, body) }) }),
    route(instrumentsApi.get, { access: 'signed-in', handler: async ({ params, user }) => ({ instrument: await getInstrument(user, params.id) }) }),
    route(instrumentsApi.update, { access: LEAD, handler: async ({ params, body }) => ({ instrument: await updateInstrument(params.id, body) }) }),
    route(instrumentsApi.candidates, { access: STAFF, handler: ({ params, user }) => instrumentCandidates(user, params.id) }),
    route(instrumentsApi.promote, { access: LEAD, handler: ({ params, body, user }) => promoteCandidates(ctx.sequelize, user, params.id, body) }),
    route(instrumentsApi.demote, { access: LEAD, handler: ({ params, body, user }) => demoteStandards(ctx.sequelize, user, params.id, body) }),
  ]
}
