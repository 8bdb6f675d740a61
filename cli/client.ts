import { randomBytes } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { request as httpRequest, type IncomingMessage } from 'node:http'
import { request as httpsRequest } from 'node:https'
import { basename } from 'node:path'
import { fillPath, type Endpoint, type RequestOf, type ResponseOf } from '../shared/api/endpoint'
import { spectraApi, type SubmitReply } from '../shared/api/spectra'

/** A refusal from the server, or a failure to reach it (status 0). */
export class ClientError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message)
  }
}

/** Answers worth another try: the server was busy or briefly away. */
export const retriable = (e: unknown) => e instanceof ClientError && (e.status === 0 || e.status === 429 || e.status === 502 || e.status === 503 || e.status === 504)

function errorOf(status: number, text: string): ClientError {
  try {
    const body = JSON.parse(text) as { error?: { code?: string; message?: string } }
    if (body.error?.code) return new ClientError(status, body.error.code, body.error.message ?? `HTTP ${status}`)
  } catch {
    // not JSON
  }
  return new ClientError(status, `http_${status}`, `The server answered ${status}.`)
}

/** Talks to one Lineweight server with one personal API token. */
export class LineweightClient {
  readonly base: URL

  constructor(
    url: string,
    private readonly token: string,
  ) {
    this.base = new URL(url.endsWith('/') ? url : `${url}/`)
  }

  private url(path: string, query?: Record<string, unknown>): URL {
    const u = new URL(`api${path}`, this.base)
    for (const [k, v] of Object.entries(query ?? {})) if (v !== undefined && v !== null) u.searchParams.set(k, String(v))
    return u
  }

  /** A JSON call to an endpoint of shared/api, typed by its schemas. */
  async call<E extends Endpoint>(endpoint: E, input: RequestOf<E>): Promise<ResponseOf<E>> {
    let res: Response
    try {
      res = await fetch(this.url(fillPath(endpoint.path, input.params as Record<string, unknown> | undefined), input.query as Record<string, unknown> | undefined), {
        method: endpoint.method.toUpperCase(),
        headers: { authorization: `Bearer ${this.token}`, accept: 'application/json', ...(input.body !== undefined ? { 'content-type': 'application/json' } : {}) },
        body: input.body !== undefined ? JSON.stringify(input.body) : undefined,
      })
    } catch (e) {
      throw new ClientError(0, 'unreachable', `Cannot reach ${this.base.origin}: ${(e as Error).message}`)
    }
    const text = await res.text()
    if (!res.ok) throw errorOf(res.status, text)
    return (text ? JSON.parse(text) : undefined) as ResponseOf<E>
  }

  /**
   * Uploads one file as the browser does (POST /api/spectra, multipart), streaming it from disk.
   * `onBytes` hears how many bytes of the request have been sent so far.
   */
  upload(path: string, size: number, fields: Record<string, string | number | undefined>, onBytes: (sent: number) => void): Promise<SubmitReply> {
    const boundary = `----lineweight${randomBytes(12).toString('hex')}`
    const parts: Buffer[] = []
    for (const [name, value] of Object.entries(fields)) {
      if (value === undefined || value === '') continue
      parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`))
    }
    const fileName = basename(path).replace(/["\r\n]/g, '_')
    const head = Buffer.concat([...parts, Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="${fileName}"\r\nContent-Type: application/octet-stream\r\n\r\n`)])
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`)
    const length = head.length + size + tail.length
    const url = this.url(spectraApi.submit.path)
    const send = url.protocol === 'https:' ? httpsRequest : httpRequest
    return new Promise((resolve, reject) => {
      const req = send(url, {
        method: 'POST',
        headers: { authorization: `Bearer ${this.token}`, accept: 'application/json', 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(length) },
      })
      let sent = 0
      const count = (n: number) => {
        sent += n
        onBytes(Math.min(sent, length))
      }
      req.on('error', (e) => reject(new ClientError(0, 'unreachable', `Cannot reach ${this.base.origin}: ${e.message}`)))
      req.on('response', (res: IncomingMessage) => {
        let text = ''
        res.setEncoding('utf8')
        res.on('data', (d: string) => (text += d))
        res.on('end', () => {
          const status = res.statusCode ?? 0
          if (status >= 200 && status < 300) resolve(JSON.parse(text) as SubmitReply)
          else reject(errorOf(status, text))
        })
      })
      req.write(head)
      count(head.length)
      const file = createReadStream(path, { highWaterMark: 256 * 1024 })
      file.on('data', (chunk) => {
        count(chunk.length)
        if (!req.write(chunk)) {
          file.pause()
          req.once('drain', () => file.resume())
        }
      })
      file.on('error', (e) => {
        req.destroy()
        reject(new ClientError(0, 'unreadable', `Cannot read ${path}: ${e.message}`))
      })
      file.on('end', () => {
        req.end(tail)
        count(tail.length)
      })
    })
  }
}
