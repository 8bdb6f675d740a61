import type { RequestHandler } from 'express'
import { HttpError } from '../lib/http-error'

/**
 * Refuses an upload whose declared size is over the limit before any of it is read: the upload
 * parser's own limits are per file, not per request.
 */
export function boundedUpload(maxBytes: number): RequestHandler {
  return (req, _res, next) => {
    const declared = req.get('content-length')
    if (declared === undefined) throw new HttpError(411, 'length_required', 'An upload must state its size (Content-Length).')
    if (Number(declared) > maxBytes) {
      throw new HttpError(413, 'upload_too_large', `This upload is ${declared} bytes; one request may carry at most ${maxBytes} bytes. Send the files in smaller batches.`)
    }
    next()
  }
}
