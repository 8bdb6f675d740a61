import { z } from 'zod'
import { id, idParams, singleLine } from './common'
import { endpoint } from './endpoint'

/** A personal API token as its owner (or a lead) sees it; the secret itself is shown once, at creation. */
export const ApiTokenView = z
  .object({
    id: z.number().int(),
    name: z.string(),
    /** The first characters of the secret, to tell tokens apart. */
    prefix: z.string(),
    owner: z.object({ id: z.number().int(), name: z.string(), email: z.string() }),
    createdAt: z.string(),
    expiresAt: z.string().nullable(),
    lastUsedAt: z.string().nullable(),
    lastUsedIp: z.string().nullable(),
    uses: z.number().int(),
    revokedAt: z.string().nullable(),
    state: z.enum(['active', 'expired', 'revoked']),
  })
  .meta({ id: 'ApiToken' })
export type ApiTokenView = z.infer<typeof ApiTokenView>

/** Longest lifetime a token may be given, days. */
export const TOKEN_MAX_DAYS = 366

export const CreateTokenInput = z.object({
  name: singleLine(80).pipe(z.string().min(1, 'is required: say which pipeline or machine uses it')),
  /** Days until the token stops working; left out or null: until it is revoked. */
  expiresInDays: z.number().int('must be a whole number of days').min(1, 'must be at least 1 day').max(TOKEN_MAX_DAYS, `must be at most ${TOKEN_MAX_DAYS} days`).nullable().default(null),
})
export type CreateTokenInput = z.infer<typeof CreateTokenInput>

export const CreatedToken = z
  .object({
    token: ApiTokenView,
    /** The secret: send it as `Authorization: Bearer <secret>`. It is not stored and cannot be shown again. */
    secret: z.string(),
  })
  .meta({ id: 'CreatedToken' })
export type CreatedToken = z.infer<typeof CreatedToken>

const tokenList = z.object({ tokens: z.array(ApiTokenView) })
const tokenReply = z.object({ token: ApiTokenView })

export const tokensApi = {
  mine: endpoint({ method: 'get', path: '/me/tokens', tag: 'API tokens', summary: "The caller's personal API tokens", response: tokenList }),
  create: endpoint({
    method: 'post',
    path: '/me/tokens',
    tag: 'API tokens',
    summary: 'Create a personal API token (the secret is in this answer only)',
    description: 'Needs a signed-in browser session: a token cannot make more tokens.',
    body: CreateTokenInput,
    status: 201,
    response: CreatedToken,
  }),
  revokeMine: endpoint({
    method: 'delete',
    path: '/me/tokens/:id',
    tag: 'API tokens',
    summary: 'Revoke one of the caller’s tokens; it is refused from the next request on',
    params: idParams,
    response: tokenReply,
  }),
  all: endpoint({ method: 'get', path: '/tokens', tag: 'API tokens', summary: "Everyone's tokens (leads)", query: z.object({ user: id.optional() }), response: tokenList }),
  revoke: endpoint({ method: 'delete', path: '/tokens/:id', tag: 'API tokens', summary: "Revoke anyone's token (leads)", params: idParams, response: tokenReply }),
}
