import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import type { Request } from 'express'
import passport from 'passport'
import type { Config } from '../config'
import type { AppContext } from '../context'
import { currentUser } from '../middleware/auth'
import { ensureCsrfToken } from '../middleware/csrf'
import { inBackground } from '../lib/background'
import { HttpError } from '../lib/http-error'
import type { User } from '../models'
import { changePasswordBody, forgotBody, loginBody, setPasswordBody, tokenQuery } from '../schemas/auth.schemas'
import { changePassword, describeToken, requestPasswordReset, setPasswordWithToken, toPublicUser } from '../services/users.service'
import { defineRoutes } from './route'

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
  return [
    limiter(config.LOGIN_MAX_ATTEMPTS * 10, address),
    limiter(config.LOGIN_MAX_ATTEMPTS, (req) => `${address(req)}|${emailKey(req)}`),
  ]
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

export function authRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/auth/csrf',
      access: 'public',
      handler: (req, res) => {
        res.json({ csrfToken: ensureCsrfToken(req.session) })
      },
    },
    {
      method: 'post',
      path: '/auth/login',
      access: 'public',
      before: loginLimiter(ctx.config),
      schema: { body: loginBody },
      handler: (req, res, next) => {
        passport.authenticate('local', (err: unknown, user: User | false, info?: { reason?: string }) => {
          if (err) return next(err)
          if (!user) {
            if (info?.reason === 'inactive') return next(new HttpError(403, 'account_inactive', 'This account has been deactivated; ask a lead of your team.'))
            return next(new HttpError(401, 'invalid_credentials', 'Wrong e-mail address or password.'))
          }
          req.login(user, (loginError) => {
            if (loginError) return next(loginError)
            req.session.startedAt = Date.now()
            req.session.lastSeenAt = Date.now()
            const csrfToken = ensureCsrfToken(req.session)
            user.lastLoginAt = new Date()
            user.save().then(
              () => res.json({ user: toPublicUser(user), csrfToken }),
              (saveError: unknown) => next(saveError),
            )
          })
        })(req, res, next)
      },
    },
    {
      method: 'post',
      path: '/auth/logout',
      access: 'public',
      handler: (req, res, next) => {
        req.logout((error) => {
          if (error) return next(error)
          res.json({ csrfToken: ensureCsrfToken(req.session) })
        })
      },
    },
    {
      method: 'post',
      path: '/auth/forgot',
      access: 'public',
      before: resetLimiter(ctx.config),
      schema: { body: forgotBody },
      handler: (_req, res) => {
        // The look-up and the mail happen after the answer, so its timing says nothing about the address.
        const email = res.locals.body.email as string
        inBackground(ctx.logger, 'password reset', () => requestPasswordReset(ctx, email))
        res.status(202).json({ message: 'If that address belongs to an account, a reset link is on its way.' })
      },
    },
    {
      method: 'get',
      path: '/auth/token',
      access: 'public',
      schema: { query: tokenQuery },
      handler: async (_req, res) => {
        res.json(await describeToken(res.locals.query.token))
      },
    },
    {
      method: 'post',
      path: '/auth/set-password',
      access: 'public',
      schema: { body: setPasswordBody },
      handler: async (_req, res) => {
        await setPasswordWithToken(ctx, res.locals.body.token, res.locals.body.password)
        res.json({ message: 'Your password is set; you can sign in now.' })
      },
    },
    {
      method: 'get',
      path: '/me',
      access: 'signed-in',
      handler: (req, res) => {
        res.json({ user: toPublicUser(currentUser(req)) })
      },
    },
    {
      method: 'post',
      path: '/me/password',
      access: 'signed-in',
      schema: { body: changePasswordBody },
      handler: async (req, res) => {
        await changePassword(ctx, currentUser(req), res.locals.body.currentPassword, res.locals.body.newPassword, req.sessionID)
        res.json({ message: 'Your password has been changed.' })
      },
    },
  ])
}
