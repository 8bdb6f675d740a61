import type { RequestHandler } from 'express'
import { HttpError } from '../lib/http-error'

/** How stale the "last seen" time may get before a request writes it back (one session write a minute at most). */
export const SEEN_RESOLUTION_MS = 60_000

/**
 * Ends a signed-in session that has been idle too long or is older than the absolute limit.
 * express-session's store does not enforce either, so the check lives here. The last-seen time is
 * written back only when it is more than a minute old, so reading pages does not write the session
 * on every request; the idle limit is kept to within that minute.
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
    if (s.startedAt === undefined) s.startedAt = started
    if (s.lastSeenAt === undefined || now - lastSeen >= SEEN_RESOLUTION_MS) s.lastSeenAt = now
    next()
  }
}
