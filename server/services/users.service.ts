import bcrypt from 'bcryptjs'
import { Op } from 'sequelize'
import type { AppContext } from '../context'
import { HttpError, notFound } from '../lib/http-error'
import { randomToken, sha256Hex } from '../lib/tokens'
import { Session, User, UserToken, type TokenPurpose } from '../models'
import type { InviteInput, PublicUser, UserChanges } from '../../shared/api/users'

export type { InviteInput, PublicUser, UserChanges }

export function toPublicUser(u: User): PublicUser {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    active: u.active,
    invited: u.passwordHash === null,
    lastLoginAt: u.lastLoginAt ? u.lastLoginAt.toISOString() : null,
    createdAt: u.createdAt.toISOString(),
  }
}

export const normaliseEmail = (email: string) => email.trim().toLowerCase()

export function hashPassword(password: string, rounds: number): Promise<string> {
  return bcrypt.hash(password, rounds)
}

// Compared against when the e-mail is unknown, so that case costs the same time as a wrong password.
let dummyHash: string | null = null
const getDummyHash = (rounds: number) => (dummyHash ??= bcrypt.hashSync('not-a-password', rounds))

/** Checks a sign-in; the reason stays on the server, the client hears only "wrong e-mail or password". */
export async function verifyCredentials(email: string, password: string, rounds: number): Promise<{ user: User } | { reason: 'unknown' | 'wrong_password' | 'inactive' | 'no_password' }> {
  const user = await User.findOne({ where: { email: normaliseEmail(email) } })
  if (!user || !user.passwordHash) {
    await bcrypt.compare(password, getDummyHash(rounds))
    return { reason: user ? 'no_password' : 'unknown' }
  }
  const ok = await bcrypt.compare(password, user.passwordHash)
  if (!ok) return { reason: 'wrong_password' }
  if (!user.active) return { reason: 'inactive' }
  return { user }
}

export async function listUsers(): Promise<PublicUser[]> {
  const users = await User.findAll({ order: [['name', 'ASC']] })
  return users.map(toPublicUser)
}

async function issueToken(ctx: AppContext, userId: number, purpose: TokenPurpose): Promise<string> {
  const token = randomToken()
  const lifetimeMs = purpose === 'invite' ? ctx.config.INVITE_HOURS * 3600_000 : ctx.config.RESET_MINUTES * 60_000
  // A new link replaces any older unused one of the same kind.
  await UserToken.update({ usedAt: new Date() }, { where: { userId, purpose, usedAt: null } })
  await UserToken.create({ userId, purpose, tokenHash: sha256Hex(token), expiresAt: new Date(Date.now() + lifetimeMs), usedAt: null })
  return token
}

function link(ctx: AppContext, token: string): string {
  return `${ctx.config.publicUrl.replace(/\/$/, '')}/set-password?token=${encodeURIComponent(token)}`
}

/** Creates the account without a password and mails a single-use link to set one. */
export async function inviteUser(ctx: AppContext, input: InviteInput, invitedBy: User): Promise<PublicUser> {
  const email = normaliseEmail(input.email)
  if (await User.findOne({ where: { email } })) {
    throw new HttpError(409, 'conflict', 'Someone with this e-mail address already has an account.', { fields: { email: 'already has an account' } })
  }
  const user = await User.create({ email, name: input.name.trim(), role: input.role, passwordHash: null, lastLoginAt: null })
  const token = await issueToken(ctx, user.id, 'invite')
  await ctx.mailer.send({
    to: email,
    subject: 'You are invited to Lineweight',
    text:
      `Hello ${user.name},\n\n${invitedBy.name} has invited you to Lineweight as ${input.role}.\n` +
      `Set your password here (the link works once and expires in ${ctx.config.INVITE_HOURS} hours):\n\n${link(ctx, token)}\n`,
  })
  return toPublicUser(user)
}

/** Sends a new invitation link to someone who has not set a password yet. */
export async function resendInvitation(ctx: AppContext, userId: number, invitedBy: User): Promise<void> {
  const user = await User.findByPk(userId)
  if (!user) throw notFound('The user')
  if (user.passwordHash) throw new HttpError(409, 'already_active', 'This person has already set a password.')
  const token = await issueToken(ctx, user.id, 'invite')
  await ctx.mailer.send({
    to: user.email,
    subject: 'Your Lineweight invitation',
    text: `Hello ${user.name},\n\n${invitedBy.name} sent you a new link to set your Lineweight password (it works once and expires in ${ctx.config.INVITE_HOURS} hours):\n\n${link(ctx, token)}\n`,
  })
}

/**
 * Changes role, name or active state; deactivating ends the person's sessions at once. A change that
 * would leave no active lead is refused; the active leads are locked while it is decided, so two
 * leads demoting each other at once cannot both succeed.
 */
export async function updateUser(ctx: Pick<AppContext, 'sequelize'>, userId: number, changes: UserChanges, actor: User): Promise<PublicUser> {
  const user = await ctx.sequelize.transaction(async (transaction) => {
    const leads = await User.findAll({ where: { role: 'lead', active: true }, attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction })
    const user = await User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE })
    if (!user) throw notFound('The user')
    if (user.id === actor.id && ((changes.role && changes.role !== actor.role) || changes.active === false)) {
      throw new HttpError(409, 'self_change', 'You cannot change your own role or deactivate yourself; ask another lead.')
    }
    const stopsLeading = user.role === 'lead' && user.active && ((changes.role !== undefined && changes.role !== 'lead') || changes.active === false)
    if (stopsLeading && leads.filter((l) => l.id !== user.id).length === 0) {
      throw new HttpError(409, 'last_lead', 'This is the last active lead; make someone else a lead first.')
    }
    if (changes.role !== undefined) user.role = changes.role
    if (changes.name !== undefined) user.name = changes.name.trim()
    if (changes.active !== undefined) user.active = changes.active
    await user.save({ transaction })
    if (changes.active === false) await Session.destroy({ where: { userId: user.id }, transaction })
    return user
  })
  return toPublicUser(user)
}

/** Changes the password and ends every other session of the account (a stolen session ends with it). */
export async function changePassword(ctx: AppContext, user: User, current: string, next: string, keepSessionId: string): Promise<void> {
  if (!user.passwordHash || !(await bcrypt.compare(current, user.passwordHash))) {
    throw new HttpError(422, 'invalid_input', 'The current password is not right.', { fields: { currentPassword: 'is not right' } })
  }
  const hash = await hashPassword(next, ctx.config.BCRYPT_ROUNDS)
  await ctx.sequelize.transaction(async (transaction) => {
    user.passwordHash = hash
    await user.save({ transaction })
    await Session.destroy({ where: { userId: user.id, sid: { [Op.ne]: keepSessionId } }, transaction })
  })
}

/** Mails a reset link when the address belongs to an active account; says nothing either way. */
export async function requestPasswordReset(ctx: AppContext, email: string): Promise<void> {
  const user = await User.findOne({ where: { email: normaliseEmail(email), active: true } })
  if (!user) return
  const token = await issueToken(ctx, user.id, 'reset')
  await ctx.mailer.send({
    to: user.email,
    subject: 'Reset your Lineweight password',
    text:
      `Hello ${user.name},\n\nSomeone asked to reset the password of your Lineweight account. ` +
      `If it was you, choose a new password here (the link works once and expires in ${ctx.config.RESET_MINUTES} minutes):\n\n${link(ctx, token)}\n\n` +
      `If it was not you, ignore this mail; your password stays as it is.\n`,
  })
}

async function findLiveToken(token: string): Promise<UserToken & { user: User }> {
  const row = await UserToken.findOne({
    where: { tokenHash: sha256Hex(token), usedAt: null, expiresAt: { [Op.gt]: new Date() } },
    include: [{ model: User, as: 'user' }],
  })
  const user = (row as unknown as { user?: User } | null)?.user
  if (!row || !user || !user.active) throw new HttpError(410, 'link_expired', 'This link has expired or has already been used. Ask for a new one.')
  return Object.assign(row, { user })
}

export async function describeToken(token: string): Promise<{ purpose: TokenPurpose; email: string; name: string }> {
  const row = await findLiveToken(token)
  return { purpose: row.purpose, email: row.user.email, name: row.user.name }
}

/** Sets the password from an invitation or reset link, once; older sessions of the account end. */
export async function setPasswordWithToken(ctx: AppContext, token: string, password: string): Promise<void> {
  const row = await findLiveToken(token)
  await ctx.sequelize.transaction(async (transaction) => {
    const [used] = await UserToken.update({ usedAt: new Date() }, { where: { id: row.id, usedAt: null }, transaction })
    if (used !== 1) throw new HttpError(410, 'link_expired', 'This link has expired or has already been used. Ask for a new one.')
    row.user.passwordHash = await hashPassword(password, ctx.config.BCRYPT_ROUNDS)
    await row.user.save({ transaction })
    await Session.destroy({ where: { userId: row.user.id }, transaction })
  })
}
