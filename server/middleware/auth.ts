import type { Request, RequestHandler } from 'express'
import { HttpError } from '../lib/http-error'
import type { User } from '../models'
import type { Access } from '../routes/route'

export function currentUser(req: Request): User {
  const user = req.user as User | undefined
  if (!user) throw new HttpError(401, 'unauthenticated', 'Please sign in.')
  return user
}

/** Refuses the request unless the signed-in user's role is allowed by the route. */
export function requireAccess(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access === 'public') return next()
    const user = currentUser(req)
    if (access !== 'signed-in' && !access.includes(user.role)) {
      throw new HttpError(403, 'forbidden', 'Your role does not allow this.')
    }
    next()
  }
}
