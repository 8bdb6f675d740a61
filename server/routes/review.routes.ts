import { disputesApi } from '../../shared/api/disputes'
import { historyApi } from '../../shared/api/history'
import { queueApi } from '../../shared/api/queue'
import { reviewApi } from '../../shared/api/review'
import type { AppContext } from '../context'
import { answerDispute, getDispute, listDisputes, settleDispute } from '../services/disputes.service'
import { historyOf } from '../services/history.service'
import { claimSpectrum, listQueue, nextInQueue, releaseClaim } from '../services/queue.service'
import { getReviewView, recordCall } from '../services/review.service'
import { LEAD, STAFF, route } from './route'

/**
 * The review queue, claims, calls, disputes and history. Calls are never changed or removed: there
 * is deliberately no PATCH or DELETE route for them; a correction is a new call.
 */
export function reviewRoutes(ctx: AppContext) {
  return [
    route(queueApi.list, { access: STAFF, handler: ({ query, user }) => listQueue(ctx, user, query) }),
    route(queueApi.next, { access: STAFF, handler: ({ query, user }) => nextInQueue(ctx, user, query) }),
    route(queueApi.claim, { access: STAFF, handler: async ({ params, user }) => ({ claim: await claimSpectrum(user, params.spectrumId, ctx.config.CLAIMS_MAX_OPEN) }) }),
    route(queueApi.release, { access: STAFF, handler: ({ params, user }) => releaseClaim(user, params.spectrumId) }),
    route(reviewApi.view, { access: STAFF, handler: ({ params, user }) => getReviewView(user, params.id) }),
    route(reviewApi.recordCall, { access: STAFF, handler: ({ params, body, user }) => recordCall(ctx, user, params.id, body) }),
    route(historyApi.get, { access: 'signed-in', handler: ({ params, user }) => historyOf(user, params.id) }),
    route(disputesApi.list, { access: LEAD, handler: ({ query }) => listDisputes(query) }),
    route(disputesApi.get, { access: LEAD, handler: async ({ params }) => ({ dispute: await getDispute(params.id) }) }),
    route(disputesApi.settle, { access: LEAD, handler: async ({ params, body, user }) => ({ dispute: await settleDispute(ctx, user, params.id, body) }) }),
    route(disputesApi.answer, { access: LEAD, handler: async ({ params, body, user }) => ({ dispute: await answerDispute(user, params.id, body) }) }),
  ]
}
