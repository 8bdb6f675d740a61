import type { RequestHandler } from 'express'
import { HttpError } from '../lib/http-error'

/**
 * Ends a signed-in session that has been idle too long or is older than the absolute limit.
 * express-session's store does not enforce either, so the check lives here.
 */
export function sessionLifetime(idleMs: number, absoluteMs: number): RequestHandler {
  return (req, _res, next) => {
    const s = req.session
    if (!s || !req.user) return next()
    const now = Date.now()
    const started = s.startedAt ?? now
    const lastSeen = s.lastSeenAt ?? now
    if (now - lastSeen > idleMs || now - started > absoluteMs) {
      return req.session.destroy(() => next(new HttpError(401, 'session_expired', 'Your session has expired; please sign in again.')))
    }
    s.startedAt = started
    s.lastSeenAt = now
    next()
  }
}
