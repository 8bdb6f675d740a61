import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import type { Request, Response } from 'express'
import passport from 'passport'
import { authApi } from '../../shared/api/auth'
import type { Config } from '../config'
import type { AppContext } from '../context'
import { ensureCsrfToken } from '../middleware/csrf'
import { inBackground } from '../lib/background'
import { HttpError } from '../lib/http-error'
import type { User } from '../models'
import { changePassword, describeToken, requestPasswordReset, setPasswordWithToken, toPublicUser } from '../services/users.service'
import { sessionOnly } from '../middleware/bearer'
import { route, type PlainRequest } from './route'

/**
 * Failed attempts are counted per address and account, so one person's typos do not lock out the
 * whole office, and per address alone (ten times as many), so trying many accounts is limited too.
 */
function loginLimiter(config: Config) {
  const limiter = (limit: number, key: (req: Request) => string) =>
    rateLimit({
      windowMs: config.LOGIN_WINDOW_MINUTES * 60_000,
      limit,
      skipSuccessfulRequests: true,
      standardHeaders: 'draft-7',
      legacyHeaders: false,
      keyGenerator: key,
      handler: () => {
        throw new HttpError(429, 'too_many_attempts', `Too many failed sign-in attempts; try again in ${config.LOGIN_WINDOW_MINUTES} minutes.`)
      },
    })
  const address = (req: Request) => ipKeyGenerator(req.ip ?? '')
  return [limiter(config.LOGIN_MAX_ATTEMPTS * 10, address), limiter(config.LOGIN_MAX_ATTEMPTS, (req) => `${address(req)}|${emailKey(req)}`)]
}

/**
 * Every reset request counts, answered or not, per address and per target account, so neither one
 * address nor many can fill an inbox.
 */
function resetLimiter(config: Config) {
  const limiter = (key: (req: Request) => string) =>
    rateLimit({
      windowMs: config.LOGIN_WINDOW_MINUTES * 60_000,
      limit: config.RESET_MAX_REQUESTS,
      standardHeaders: 'draft-7',
      legacyHeaders: false,
      keyGenerator: key,
      handler: () => {
        throw new HttpError(429, 'too_many_requests', `Too many reset requests; try again in ${config.LOGIN_WINDOW_MINUTES} minutes.`)
      },
    })
  return [limiter((req) => ipKeyGenerator(req.ip ?? '')), limiter((req) => `reset|${emailKey(req)}`)]
}

/** The e-mail field as a short key; anything that is not a string counts as one shared key. */
const emailKey = (req: Request) => {
  const email: unknown = req.body?.email
  return typeof email === 'string' ? email.trim().toLowerCase().slice(0, 254) : '?'
}

/** Runs passport's local strategy and signs the user in (the session id changes). */
function signIn(req: PlainRequest, res: Response): Promise<User> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', (err: unknown, user: User | false, info?: { reason?: string }) => {
      if (err) return reject(err)
      if (!user) {
        if (info?.reason === 'inactive') return reject(new HttpError(403, 'account_inactive', 'This account has been deactivated; ask a lead of your team.'))
        return reject(new HttpError(401, 'invalid_credentials', 'Wrong e-mail address or password.'))
      }
      req.login(user, (loginError) => (loginError ? reject(loginError) : resolve(user)))
    })(req as Request, res, reject)
  })
}

export function authRoutes(ctx: AppContext) {
  return [
    route(authApi.csrf, { access: 'public', handler: (_input, { req }) => ({ csrfToken: ensureCsrfToken(req.session) }) }),
    route(authApi.login, {
      access: 'public',
      before: loginLimiter(ctx.config),
      handler: async (_input, { req, res }) => {
        const user = await signIn(req, res)
        req.session.startedAt = Date.now()
        req.session.lastSeenAt = Date.now()
        const csrfToken = ensureCsrfToken(req.session)
        user.lastLoginAt = new Date()
        await user.save()
        return { user: toPublicUser(user), csrfToken }
      },
    }),
    route(authApi.logout, {
      access: 'public',
      handler: (_input, { req }) =>
        new Promise((resolve, reject) => {
          req.logout((error) => (error ? reject(error) : resolve({ csrfToken: ensureCsrfToken(req.session) })))
        }),
    }),
    route(authApi.forgot, {
      access: 'public',
      before: resetLimiter(ctx.config),
      handler: ({ body }) => {
        // The look-up and the mail happen after the answer, so its timing says nothing about the address.
        inBackground(ctx.logger, 'password reset', () => requestPasswordReset(ctx, body.email))
        return { message: 'If that address belongs to an account, a reset link is on its way.' }
      },
    }),
    route(authApi.describeLink, { access: 'public', handler: ({ query }) => describeToken(query.token) }),
    route(authApi.setPassword, {
      access: 'public',
      handler: async ({ body }) => {
        await setPasswordWithToken(ctx, body.token, body.password)
        return { message: 'Your password is set; you can sign in now.' }
      },
    }),
    route(authApi.me, { access: 'signed-in', handler: ({ user }) => ({ user: toPublicUser(user) }) }),
    route(authApi.changePassword, {
      access: 'signed-in',
      before: [sessionOnly('Changing the password')],
      handler: async ({ body, user }, { req }) => {
        await changePassword(ctx, user, body.currentPassword, body.newPassword, req.sessionID)
        return { message: 'Your password has been changed.' }
      },
    }),
  ]
}
