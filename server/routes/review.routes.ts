import type { AppContext } from '../context'
import { currentUser } from '../middleware/auth'
import { idParams } from '../schemas/common'
import { callBody, disputeActionBody, disputesQuery, nextQuery, queueQuery, settleBody, spectrumIdParams } from '../schemas/review.schemas'
import { answerDispute, getDispute, listDisputes, settleDispute } from '../services/disputes.service'
import { historyOf } from '../services/history.service'
import { claimSpectrum, listQueue, nextInQueue, releaseClaim } from '../services/queue.service'
import { getReviewView, recordCall } from '../services/review.service'
import { LEAD, STAFF, defineRoutes } from './route'

/**
 * The review queue, claims, calls, disputes and history. Calls are never changed or removed: there
 * is deliberately no PATCH or DELETE route for them; a correction is a new call.
 */
export function reviewRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/queue',
      access: STAFF,
      schema: { query: queueQuery },
      handler: async (req, res) => {
        res.json(await listQueue(ctx, currentUser(req), res.locals.query))
      },
    },
    {
      method: 'get',
      path: '/queue/next',
      access: STAFF,
      schema: { query: nextQuery },
      handler: async (req, res) => {
        res.json(await nextInQueue(ctx, currentUser(req), res.locals.query))
      },
    },
    {
      method: 'post',
      path: '/queue/:spectrumId/claim',
      access: STAFF,
      schema: { params: spectrumIdParams },
      handler: async (req, res) => {
        res.json({ claim: await claimSpectrum(currentUser(req), res.locals.params.spectrumId, ctx.config.CLAIMS_MAX_OPEN) })
      },
    },
    {
      method: 'delete',
      path: '/queue/:spectrumId/claim',
      access: STAFF,
      schema: { params: spectrumIdParams },
      handler: async (req, res) => {
        await releaseClaim(currentUser(req), res.locals.params.spectrumId)
        res.status(204).end()
      },
    },
    {
      method: 'get',
      path: '/spectra/:id/review',
      access: STAFF,
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json(await getReviewView(currentUser(req), res.locals.params.id))
      },
    },
    {
      method: 'post',
      path: '/spectra/:id/calls',
      access: STAFF,
      schema: { params: idParams, body: callBody },
      handler: async (req, res) => {
        res.status(201).json(await recordCall(ctx, currentUser(req), res.locals.params.id, res.locals.body))
      },
    },
    {
      method: 'get',
      path: '/spectra/:id/history',
      access: 'signed-in',
      schema: { params: idParams },
      handler: async (req, res) => {
        res.json(await historyOf(currentUser(req), res.locals.params.id))
      },
    },
    {
      method: 'get',
      path: '/disputes',
      access: LEAD,
      schema: { query: disputesQuery },
      handler: async (_req, res) => {
        res.json(await listDisputes(res.locals.query))
      },
    },
    {
      method: 'get',
      path: '/disputes/:id',
      access: LEAD,
      schema: { params: idParams },
      handler: async (_req, res) => {
        res.json({ dispute: await getDispute(res.locals.params.id) })
      },
    },
    {
      method: 'post',
      path: '/disputes/:id/settle',
      access: LEAD,
      schema: { params: idParams, body: settleBody },
      handler: async (req, res) => {
        res.json({ dispute: await settleDispute(ctx, currentUser(req), res.locals.params.id, res.locals.body) })
      },
    },
    {
      method: 'post',
      path: '/disputes/:id/answer',
      access: LEAD,
      schema: { params: idParams, body: disputeActionBody },
      handler: async (req, res) => {
        res.json({ dispute: await answerDispute(currentUser(req), res.locals.params.id, res.locals.body) })
      },
    },
  ])
}
