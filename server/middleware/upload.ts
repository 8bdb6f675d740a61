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

/** A refilling allowance: `perMinute` units a minute, holding at most a minute's worth. */
class Bucket {
  private level: number
  private at: number
  constructor(
    private readonly perMinute: number,
    now: number,
  ) {
    this.level = perMinute
    this.at = now
  }
  refill(now: number): number {
    this.level = Math.min(this.perMinute, this.level + ((now - this.at) / 60_000) * this.perMinute)
    this.at = now
    return this.level
  }
  take(units: number): void {
    this.level -= units
  }
  /** Seconds until the level is back up to `units` (at most a minute's worth). */
  secondsUntil(units: number): number {
    const missing = Math.min(units, this.perMinute) - this.level
    return missing <= 0 ? 0 : Math.ceil((missing / this.perMinute) * 60)
  }
  get full(): boolean {
    return this.level >= this.perMinute
  }
}

/**
 * Limits what one person uploads by what it weighs, not by how many requests carry it: at most
 * `bytesPerMinute` bytes and `filesPerMinute` files a minute, so a pipeline may send one file per
 * request or five hundred. The bytes are taken from the declared size before anything is read;
 * the files are counted once the upload is parsed (a batch that overdraws makes the next wait).
 * Refusals are 429 with Retry-After saying when the allowance will be back.
 */
export function uploadBudget(bytesPerMinute: number, filesPerMinute: number): { before: RequestHandler; countFiles: RequestHandler } {
  const budgets = new Map<number, { bytes: Bucket; files: Bucket }>()
  const budgetOf = (userId: number, now: number) => {
    let b = budgets.get(userId)
    if (!b) {
      // Forget people whose allowance is whole again, so the map stays small.
      if (budgets.size > 1000) for (const [id, x] of budgets) if (x.bytes.refill(now) && x.bytes.full && x.files.refill(now) && x.files.full) budgets.delete(id)
      b = { bytes: new Bucket(bytesPerMinute, now), files: new Bucket(filesPerMinute, now) }
      budgets.set(userId, b)
    }
    b.bytes.refill(now)
    b.files.refill(now)
    return b
  }
  const before: RequestHandler = (req, res, next) => {
    const now = Date.now()
    const b = budgetOf((req.user as User).id, now)
    const bytes = Number(req.get('content-length') ?? 0)
    const wait = Math.max(b.bytes.secondsUntil(bytes), b.files.secondsUntil(1))
    if (wait > 0) {
      res.set('retry-after', String(wait))
      throw new HttpError(
        429,
        'upload_allowance_used',
        `You have uploaded as much as the server takes in a minute (${bytesPerMinute} bytes and ${filesPerMinute} files per person); send the rest in ${wait} s.`,
        {
          retryAfterSeconds: wait,
        },
      )
    }
    b.bytes.take(bytes)
    next()
  }
  const countFiles: RequestHandler = (req, _res, next) => {
    const files = (req.files as Express.Multer.File[] | undefined) ?? []
    budgetOf((req.user as User).id, Date.now()).files.take(files.length)
    next()
  }
  return { before, countFiles }
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
      // A file still arriving when the client went away, or one multer already removed, has no path.
      const files = (req.files as Partial<Express.Multer.File>[] | undefined) ?? []
      for (const f of files) if (f.path) rm(f.path, { force: true }).catch(() => undefined)
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
