import { mkdtemp, readdir, rm } from 'node:fs/promises'
import { request, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import express from 'express'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { multipartToDisk } from '../../../server/middleware/upload'

const BOUNDARY = 'lineweight-test-boundary'

function part(name: string, body: string): string {
  return `--${BOUNDARY}\r\nContent-Disposition: form-data; name="files"; filename="${name}"\r\nContent-Type: text/plain\r\n\r\n${body}\r\n`
}

describe('multipartToDisk', () => {
  let dir: string
  let server: Server
  let port: number
  const seen: string[] = []

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'lineweight-multipart-'))
    const app = express()
    app.post('/up', multipartToDisk(dir, { UPLOAD_MAX_BYTES: 1000, UPLOAD_MAX_FILES: 4 }), (req, res) => {
      res.json({ files: (req.files as Express.Multer.File[]).length })
    })
    app.use((err: Error, _req: express.Request, res: express.Response, _next: express.NextFunction) => {
      seen.push(err.name)
      res.status(400).json({ error: err.message })
    })
    server = app.listen(0, '127.0.0.1')
    await new Promise((resolve) => server.once('listening', resolve))
    port = (server.address() as AddressInfo).port
  })
  afterAll(async () => {
    server.close()
    await rm(dir, { recursive: true, force: true })
  })

  function send(body: string, declaredLength: number, abort: boolean): Promise<number | 'aborted'> {
    return new Promise((resolve) => {
      const req = request({ host: '127.0.0.1', port, path: '/up', method: 'POST', headers: { 'content-type': `multipart/form-data; boundary=${BOUNDARY}`, 'content-length': declaredLength } })
      req.on('response', (res) => {
        res.resume()
        res.on('end', () => resolve(res.statusCode ?? 0))
      })
      req.on('error', () => resolve('aborted'))
      req.write(body)
      if (abort) setTimeout(() => req.destroy(), 100)
      else req.end()
    })
  }

  async function stillAnswers(): Promise<number | 'aborted'> {
    const body = part('a.txt', '4000 1.0\n') + `--${BOUNDARY}--\r\n`
    return send(body, Buffer.byteLength(body), false)
  }

  it('survives a client that goes away while a file is arriving, and leaves nothing on disk', async () => {
    // One whole file, then a second cut off half-way: the second has no path yet when the socket closes.
    const body = part('a.txt', '4000 1.0\n') + `--${BOUNDARY}\r\nContent-Disposition: form-data; name="files"; filename="b.txt"\r\n\r\n4000 1.0\n`
    expect(await send(body, Buffer.byteLength(body) + 500, true)).toBe('aborted')
    await new Promise((resolve) => setTimeout(resolve, 200))
    expect(await stillAnswers()).toBe(200)
    await new Promise((resolve) => setTimeout(resolve, 100))
    expect(await readdir(dir)).toEqual([])
  })

  it('removes the files already written when a later one is over the size limit', async () => {
    const body = part('a.txt', '4000 1.0\n') + part('b.txt', 'x'.repeat(2000)) + `--${BOUNDARY}--\r\n`
    expect(await send(body, Buffer.byteLength(body), false)).toBe(400)
    expect(seen).toContain('MulterError')
    expect(await stillAnswers()).toBe(200)
    await new Promise((resolve) => setTimeout(resolve, 100))
    expect(await readdir(dir)).toEqual([])
  })
})
