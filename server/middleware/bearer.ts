import type { RequestHandler } from 'express'
import { HttpError } from '../lib/http-error'
import type { ApiToken } from '../models'
import { userForSecret } from '../services/tokens.service'

declare global {
  namespace Express {
    interface Request {
      /** Set when the request came with `Authorization: Bearer <personal API token>`. */
      apiToken?: ApiToken
    }
  }
}

/**
 * Signs the request in with a personal API token. Such requests carry no session cookie, so they
 * skip the session, its lifetime and the CSRF check (a browser never adds the header by itself).
 * The sign-in routes keep to sessions.
 */
export const bearerAuth: RequestHandler = async (req, _res, next) => {
  const header = req.get('authorization')
  if (!header || req.path.startsWith('/auth/')) return next()
  const match = /^Bearer +([\x21-\x7e]+)$/i.exec(header.trim())
  if (!match) throw new HttpError(401, 'invalid_token', 'Send the token as "Authorization: Bearer <token>".')
  const { user, token } = await userForSecret(match[1]!, req.ip)
  req.user = user
  req.apiToken = token
  next()
}

/** Runs the middleware only for requests without an API token. */
export const unlessBearer =
  (middleware: RequestHandler): RequestHandler =>
  (req, res, next) =>
    req.apiToken ? next() : middleware(req, res, next)

/** Refuses API tokens on routes that need the person at a browser (a token must not make more tokens). */
export const sessionOnly =
  (what: string): RequestHandler =>
  (req, _res, next) => {
    if (req.apiToken) throw new HttpError(403, 'session_required', `${what} needs you signed in with your password, not an API token.`)
    next()
  }
