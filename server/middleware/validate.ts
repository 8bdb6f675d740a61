import type { RequestHandler } from 'express'
import type { ZodError } from 'zod'
import { HttpError } from '../lib/http-error'
import type { RouteSchema } from '../routes/route'

function fieldErrors(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.join('.') || '_'
    out[key] ??= issue.message
  }
  return out
}

/** Parses body, query and params with the route's schemas; the parsed values go to res.locals. */
export function validate(schema: RouteSchema): RequestHandler {
  return (req, res, next) => {
    for (const part of ['params', 'query', 'body'] as const) {
      const s = schema[part]
      if (!s) continue
      const result = s.safeParse(req[part] ?? {})
      if (!result.success) {
        throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: fieldErrors(result.error) })
      }
      res.locals[part] = result.data
    }
    next()
  }
}
