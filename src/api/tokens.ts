import { tokensApi, type ApiTokenView, type CreateTokenInput, type CreatedToken } from '@shared/api/tokens'
import { call } from './http'

export type { ApiTokenView, CreatedToken }
export { TOKEN_MAX_DAYS } from '@shared/api/tokens'

export const listMyTokens = async (): Promise<ApiTokenView[]> => (await call(tokensApi.mine)).tokens

/** The answer carries the secret, which the server keeps only as a hash: show it once. */
export const createToken = (input: CreateTokenInput): Promise<CreatedToken> => call(tokensApi.create, { body: input })

export const revokeMyToken = async (id: number): Promise<ApiTokenView> => (await call(tokensApi.revokeMine, { params: { id } })).token

/** Everyone's tokens (leads). */
export const listAllTokens = async (): Promise<ApiTokenView[]> => (await call(tokensApi.all)).tokens

export const revokeAnyToken = async (id: number): Promise<ApiTokenView> => (await call(tokensApi.revoke, { params: { id } })).token
