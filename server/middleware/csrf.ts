import type { RequestHandler } from 'express'
import { HttpError } from '../lib/http-error'
import { randomToken, safeEqual } from '../lib/tokens'

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string
    startedAt?: number
    lastSeenAt?: number
  }
}

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

export function ensureCsrfToken(session: { csrfToken?: string }): string {
  session.csrfToken ??= randomToken()
  return session.csrfToken
}

/** Synchroniser-token check: every state-changing request carries the session's token in x-csrf-token. */
export const csrfProtection: RequestHandler = (req, _res, next) => {
  if (SAFE.has(req.method)) return next()
  const sent = req.get('x-csrf-token')
  const expected = req.session?.csrfToken
  if (!sent || !expected || !safeEqual(sent, expected)) {
    throw new HttpError(403, 'csrf_failed', 'The request is missing a valid CSRF token; reload the page and try again.')
  }
  next()
}
