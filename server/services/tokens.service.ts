import { Op, literal } from 'sequelize'
import type { ApiTokenView, CreateTokenInput, CreatedToken } from '../../shared/api/tokens'
import { HttpError, notFound } from '../lib/http-error'
import { randomToken, sha256Hex } from '../lib/tokens'
import { ApiToken, User } from '../models'

/** Tokens one person may hold at once (revoked and expired ones do not count). */
export const TOKENS_PER_USER = 20

/** Secrets start with this, so a leaked one is easy to recognise in logs and code. */
const SECRET_PREFIX = 'lw_'
/** Characters of the secret kept to tell tokens apart. */
const SHOWN = 10

type TokenRow = ApiToken & { owner?: User }

function stateOf(t: ApiToken, now: Date): ApiTokenView['state'] {
  if (t.revokedAt) return 'revoked'
  if (t.expiresAt && t.expiresAt <= now) return 'expired'
  return 'active'
}

function toView(t: TokenRow, now = new Date()): ApiTokenView {
  return {
    id: t.id,
    name: t.name,
    prefix: t.prefix,
    owner: { id: t.userId, name: t.owner?.name ?? '', email: t.owner?.email ?? '' },
    createdAt: t.createdAt.toISOString(),
    expiresAt: t.expiresAt ? t.expiresAt.toISOString() : null,
    lastUsedAt: t.lastUsedAt ? t.lastUsedAt.toISOString() : null,
    lastUsedIp: t.lastUsedIp ?? null,
    uses: t.uses ?? 0,
    revokedAt: t.revokedAt ? t.revokedAt.toISOString() : null,
    state: stateOf(t, now),
  }
}

const withOwner = { model: User, as: 'owner', attributes: ['id', 'name', 'email'] }

/** Tokens of one person, or of everyone; active ones first, newest first. */
export async function listTokens(userId?: number): Promise<ApiTokenView[]> {
  const rows = await ApiToken.findAll({ where: userId === undefined ? {} : { userId }, include: [withOwner], order: [['id', 'DESC']] })
  const now = new Date()
  const views = rows.map((r) => toView(r as TokenRow, now))
  return [...views.filter((v) => v.state === 'active'), ...views.filter((v) => v.state !== 'active')]
}

/** Makes a token for the user; the secret is returned once and only its SHA-256 is kept. */
export async function createToken(user: User, input: CreateTokenInput, now = new Date()): Promise<CreatedToken> {
  const active = await ApiToken.count({ where: { userId: user.id, revokedAt: null, [Op.or]: [{ expiresAt: null }, { expiresAt: { [Op.gt]: now } }] } })
  if (active >= TOKENS_PER_USER) throw new HttpError(409, 'too_many_tokens', `You hold ${TOKENS_PER_USER} active tokens, the most one person may have; revoke one you no longer use.`)
  const secret = `${SECRET_PREFIX}${randomToken(32)}`
  const row = await ApiToken.create({
    userId: user.id,
    name: input.name,
    tokenHash: sha256Hex(secret),
    prefix: secret.slice(0, SHOWN),
    expiresAt: input.expiresInDays === null ? null : new Date(now.getTime() + input.expiresInDays * 86_400_000),
  })
  ;(row as TokenRow).owner = user
  return { token: toView(row as TokenRow, now), secret }
}

/**
 * Revokes a token at once: the next request that carries it is refused. `ownerId` limits it to that
 * person's tokens (someone else's token does not exist for them); leads pass none.
 */
export async function revokeToken(actor: User, id: number, ownerId?: number): Promise<ApiTokenView> {
  const row = await ApiToken.findOne({ where: ownerId === undefined ? { id } : { id, userId: ownerId }, include: [withOwner] })
  if (!row) throw notFound('The token')
  if (!row.revokedAt) {
    row.revokedAt = new Date()
    row.revokedBy = actor.id
    await row.save()
  }
  return toView(row as TokenRow)
}

/**
 * The person a bearer secret acts for, or a refusal. Looked up on every request (no cache), so a
 * revoked or expired token is refused from the next request on; each use is recorded on the row.
 */
export async function userForSecret(secret: string, ip: string | undefined, now = new Date()): Promise<{ user: User; token: ApiToken }> {
  const refused = new HttpError(401, 'invalid_token', 'The API token is not valid: it is unknown, revoked or expired.')
  if (!secret.startsWith(SECRET_PREFIX) || secret.length > 200) throw refused
  const token = await ApiToken.findOne({ where: { tokenHash: sha256Hex(secret) } })
  if (!token || stateOf(token, now) !== 'active') throw refused
  const user = await User.findByPk(token.userId)
  if (!user || !user.active) throw new HttpError(403, 'account_inactive', 'The account this token belongs to has been deactivated.')
  await ApiToken.update({ lastUsedAt: now, lastUsedIp: ip?.slice(0, 64) ?? null, uses: literal('uses + 1') as never }, { where: { id: token.id } })
  return { user, token }
}
