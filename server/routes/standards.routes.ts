import { standardsApi } from '../../shared/api/standards'
import type { AppContext } from '../context'
import { sendSeries } from '../lib/series'
import { addObservedStandard, listLibrary, publishVersion, retireStandard, standardSeries } from '../services/standards.service'
import { resuggestCampaign } from '../services/suggestions.service'
import { LEAD, STAFF, route } from './route'

export function standardsRoutes(ctx: AppContext) {
  return [
    route(standardsApi.library, { access: STAFF, handler: () => listLibrary() }),
    route(standardsApi.add, { access: LEAD, handler: async ({ body, user }) => ({ standard: await addObservedStandard(user, body) }) }),
    route(standardsApi.publish, { access: LEAD, handler: async ({ body, user }) => ({ version: await publishVersion(ctx.sequelize, user, body) }) }),
    route(standardsApi.retire, { access: LEAD, handler: async ({ params }) => ({ standard: await retireStandard(params.id) }) }),
    route(standardsApi.data, { access: STAFF, handler: async ({ params }, { res }) => sendSeries(res, await standardSeries(params.id)) }),
    route(standardsApi.resuggest, { access: LEAD, handler: ({ params, user }) => resuggestCampaign(ctx, user, params.id) }),
  ]
}
