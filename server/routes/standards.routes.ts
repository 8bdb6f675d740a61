import type { AppContext } from '../context'
import { sendSeries } from '../lib/series'
import { currentUser } from '../middleware/auth'
import { idParams } from '../schemas/common'
import { addStandardBody, publishVersionBody } from '../schemas/standards.schemas'
import { addObservedStandard, listLibrary, publishVersion, retireStandard, standardSeries } from '../services/standards.service'
import { resuggestCampaign } from '../services/suggestions.service'
import { LEAD, STAFF, defineRoutes } from './route'

export function standardsRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/standards',
      access: STAFF,
      handler: async (_req, res) => {
        res.json(await listLibrary())
      },
    },
    {
      method: 'post',
      path: '/standards',
      access: LEAD,
      schema: { body: addStandardBody },
      handler: async (req, res) => {
        res.status(201).json({ standard: await addObservedStandard(currentUser(req), res.locals.body) })
      },
    },
    {
      method: 'post',
      path: '/standards/versions',
      access: LEAD,
      schema: { body: publishVersionBody },
      handler: async (req, res) => {
        res.status(201).json({ version: await publishVersion(ctx.sequelize, currentUser(req), res.locals.body) })
      },
    },
    {
      method: 'post',
      path: '/standards/:id/retire',
      access: LEAD,
      schema: { params: idParams },
      handler: async (_req, res) => {
        res.json({ standard: await retireStandard(res.locals.params.id) })
      },
    },
    {
      method: 'get',
      path: '/standards/:id/data',
      access: STAFF,
      schema: { params: idParams },
      handler: async (_req, res) => {
        sendSeries(res, await standardSeries(res.locals.params.id))
      },
    },
    {
      method: 'post',
      path: '/campaigns/:id/resuggest',
      access: LEAD,
      schema: { params: idParams },
      handler: async (req, res) => {
        res.status(202).json(await resuggestCampaign(ctx, currentUser(req), res.locals.params.id))
      },
    },
  ])
}
