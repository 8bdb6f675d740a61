import type { AppContext } from '../context'
import { currentUser } from '../middleware/auth'
import { idParams } from '../schemas/common'
import { createInstrumentBody, demoteBody, instrumentListQuery, promoteBody, updateInstrumentBody } from '../schemas/instruments.schemas'
import { createInstrument, getInstrument, listInstruments, updateInstrument } from '../services/instruments.service'
import { demoteStandards, instrumentCandidates, promoteCandidates } from '../services/promotion.service'
import { LEAD, STAFF, defineRoutes } from './route'

export function instrumentRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/instruments',
      access: 'signed-in',
      schema: { query: instrumentListQuery },
      handler: async (req, res) => {
        res.json({ instruments: await listInstruments(currentUser(req), res.locals.query.campaign) })
      },
    },
    {
      method: 'post',
      path: '/instruments',
      access: LEAD,
      schema: { body: createInstrumentBody },
      handler: async (req, res) => {
        res.status(201).json({ instrument: await createInstrument(currentUser(req), res.locals.body) })
      },
    },
    {
      method: 'get',
      path: '/instruments/:id',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json({ instrument: await getInstrument(currentUser(req), res.locals.params.id) })
      },
    },
    {
      method: 'patch',
      path: '/instruments/:id',
      access: LEAD,
      schema: { params: idParams, body: updateInstrumentBody },
      handler: async (_req, res) => {
        res.json({ instrument: await updateInstrument(res.locals.params.id, res.locals.body) })
      },
    },
    {
      method: 'get',
      path: '/instruments/:id/candidates',
      access: STAFF,
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json(await instrumentCandidates(currentUser(req), res.locals.params.id))
      },
    },
    {
      method: 'post',
      path: '/instruments/:id/promote',
      access: LEAD,
      schema: { params: idParams, body: promoteBody },
      handler: async (req, res) => {
        res.status(201).json(await promoteCandidates(ctx.sequelize, currentUser(req), res.locals.params.id, res.locals.body))
      },
    },
    {
      method: 'post',
      path: '/instruments/:id/demote',
      access: LEAD,
      schema: { params: idParams, body: demoteBody },
      handler: async (req, res) => {
        res.status(201).json(await demoteStandards(ctx.sequelize, currentUser(req), res.locals.params.id, res.locals.body))
      },
    },
  ])
}
