import { rm } from 'node:fs/promises'
import type { RequestHandler } from 'express'
import multer, { MulterError } from 'multer'
import type { Config } from '../config'
import { HttpError } from '../lib/http-error'
import type { User } from '../models'

/**
 * At most `perUser` uploads of one person and `total` of everyone at a time; more is refused with
 * 429 and Retry-After, before any of the body is read.
 */
export function uploadSlots(perUser: number, total: number): RequestHandler {
  const byUser = new Map<number, number>()
  let running = 0
  return (req, res, next) => {
    const userId = (req.user as User).id
    const mine = byUser.get(userId) ?? 0
    if (mine >= perUser || running >= total) {
      res.set('retry-after', '5')
      const why = mine >= perUser ? `you already have ${mine} upload${mine === 1 ? '' : 's'} in progress (at most ${perUser})` : 'the server is taking as many uploads as it can'
      throw new HttpError(429, 'too_many_uploads', `Not now: ${why}. Try again when one has finished.`)
    }
    byUser.set(userId, mine + 1)
    running++
    let done = false
    const release = () => {
      if (done) return
      done = true
      running--
      const left = (byUser.get(userId) ?? 1) - 1
      if (left > 0) byUser.set(userId, left)
      else byUser.delete(userId)
    }
    res.once('close', release)
    res.once('finish', release)
    next()
  }
}

/** Control characters cannot be part of a multipart header value (RFC 7578 / RFC 9110). */
const BAD_NAME = /[\u0000-\u001f\u007f]/

/**
 * Parses multipart/form-data, writing each file to `dir` as it arrives (never the whole body in
 * memory). Malformed bodies answer 400; the written files are removed when the response is done.
 */
export function multipartToDisk(dir: string, config: Pick<Config, 'UPLOAD_MAX_BYTES' | 'UPLOAD_MAX_FILES'>): RequestHandler {
  const parse = multer({
    dest: dir,
    limits: { fileSize: config.UPLOAD_MAX_BYTES, files: config.UPLOAD_MAX_FILES, fields: 40, fieldSize: 64 * 1024, parts: config.UPLOAD_MAX_FILES + 40 },
  }).array('files')
  return (req, res, next) => {
    res.once('close', () => {
      const files = (req.files as Express.Multer.File[] | undefined) ?? []
      for (const f of files) void rm(f.path, { force: true })
    })
    parse(req, res, (error?: unknown) => {
      if (error instanceof MulterError || error instanceof HttpError) return next(error)
      if (error) return next(new HttpError(400, 'malformed_upload', `The upload could not be read: ${(error as Error).message ?? 'malformed multipart body'}.`))
      const files = (req.files as Express.Multer.File[] | undefined) ?? []
      const bad = files.find((f) => BAD_NAME.test(f.originalname))
      if (bad) return next(new HttpError(400, 'invalid_file_name', 'A file name holds control characters; rename the file and send it again.'))
      next()
    })
  }
}
