import { tokensApi } from '../../shared/api/tokens'
import { sessionOnly } from '../middleware/bearer'
import { createToken, listTokens, revokeToken } from '../services/tokens.service'
import { LEAD, route } from './route'

export function tokenRoutes() {
  return [
    route(tokensApi.mine, { access: 'signed-in', handler: async ({ user }) => ({ tokens: await listTokens(user.id) }) }),
    route(tokensApi.create, { access: 'signed-in', before: [sessionOnly('Creating a token')], handler: ({ body, user }) => createToken(user, body) }),
    route(tokensApi.revokeMine, { access: 'signed-in', handler: async ({ params, user }) => ({ token: await revokeToken(user, params.id, user.id) }) }),
    route(tokensApi.all, { access: LEAD, handler: async ({ query }) => ({ tokens: await listTokens(query.user) }) }),
    route(tokensApi.revoke, { access: LEAD, handler: async ({ params, user }) => ({ token: await revokeToken(user, params.id) }) }),
  ]
}
