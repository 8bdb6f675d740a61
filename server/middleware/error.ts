import type { ErrorRequestHandler, RequestHandler } from 'express'
import { MulterError } from 'multer'
import { UniqueConstraintError, ValidationError } from 'sequelize'
import type { Logger } from 'pino'
import { isDatabaseUnavailable } from '../lib/db-errors'
import { HttpError } from '../lib/http-error'

export const apiNotFound: RequestHandler = (req) => {
  throw new HttpError(404, 'not_found', `No API route ${req.method} ${req.originalUrl}.`)
}

function toHttpError(err: unknown): HttpError | null {
  if (err instanceof HttpError) return err
  if (err instanceof UniqueConstraintError) {
    const fields = Object.fromEntries(err.errors.map((e) => [e.path ?? '_', `${e.path ?? 'value'} is already taken`]))
    return new HttpError(409, 'conflict', 'A record with this value already exists.', { fields })
  }
  if (err instanceof ValidationError) {
    const fields = Object.fromEntries(err.errors.map((e) => [e.path ?? '_', e.message]))
    return new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields })
  }
  if (err instanceof MulterError) {
    const status = err.code === 'LIMIT_FILE_SIZE' || err.code === 'LIMIT_FILE_COUNT' ? 413 : 400
    return new HttpError(status, `upload_${err.code.toLowerCase()}`, err.message, { field: err.field })
  }
  const e = err as { type?: string; status?: number; limit?: number }
  if (e?.type === 'entity.parse.failed') return new HttpError(400, 'malformed_json', 'The request body is not valid JSON.')
  if (e?.type === 'entity.too.large') return new HttpError(413, 'payload_too_large', `The request body is larger than the ${e.limit} bytes allowed.`)
  if (e?.type && typeof e.status === 'number' && e.status < 500) return new HttpError(e.status, 'bad_request', 'The request could not be read.')
  return null
}

/**
 * The one error handler: `{ error: { code, message, details } }`, hiding unexpected 5xx messages in
 * production. A database that cannot be reached is 503 with Retry-After, so clients wait and retry.
 */
export function errorHandler(logger: Logger, production: boolean, retryAfterSeconds = 5): ErrorRequestHandler {
  return (err, req, res, _next) => {
    if (isDatabaseUnavailable(err)) {
      logger.warn({ method: req.method, url: req.originalUrl, err: (err as Error)?.message }, 'database unavailable')
      res.set('retry-after', String(retryAfterSeconds))
      res.status(503).json({ error: { code: 'database_unavailable', message: `The database is unavailable at the moment; try again in ${retryAfterSeconds} seconds.`, details: null } })
      return
    }
    const known = toHttpError(err)
    if (known) {
      res.status(known.status).json({ error: { code: known.code, message: known.message, details: known.details ?? null } })
      return
    }
    logger.error({ err, method: req.method, url: req.originalUrl }, 'unhandled error')
    const message = production ? 'Something went wrong on the server.' : String((err as Error)?.message ?? err)
    res.status(500).json({ error: { code: 'internal', message, details: null } })
  }
}
