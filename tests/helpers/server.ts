import { spawn, type ChildProcess } from 'node:child_process'
import { readFileSync, readdirSync } from 'node:fs'
import { createServer } from 'node:net'
import { setTimeout as sleep } from 'node:timers/promises'

/** A port nothing listens on right now (the kernel picks it). */
export async function freePort(): Promise<number> {
  const server = createServer()
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const { port } = server.address() as { port: number }
  await new Promise((resolve) => server.close(resolve))
  return port
}

/** Resident memory (bytes) of a process and all its descendants, from /proc. */
export function treeRss(pid: number): number {
  const children = new Map<number, number[]>()
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue
    try {
      const stat = readFileSync(`/proc/${entry}/stat`, 'utf8')
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1])
      children.set(ppid, [...(children.get(ppid) ?? []), Number(entry)])
    } catch {
      // the process ended meanwhile
    }
  }
  let total = 0
  const walk = (p: number) => {
    try {
      const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${p}/status`, 'utf8'))
      total += m ? Number(m[1]) * 1024 : 0
    } catch {
      // gone
    }
    for (const c of children.get(p) ?? []) walk(c)
  }
  walk(pid)
  return total
}

export interface RunningServer {
  url: string
  process: ChildProcess
  output: () => string
  stop(): Promise<void>
}

/** The real server (`server/index.ts`) in its own process group, over the test database unless `env` says otherwise. */
export async function startServer(env: NodeJS.ProcessEnv = {}): Promise<RunningServer> {
  const port = await freePort()
  const child = spawn('node_modules/.bin/tsx', ['server/index.ts'], {
    env: { ...process.env, PORT: String(port), SMTP_PORT: '0', LOG_LEVEL: 'warn', ...env },
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let out = ''
  child.stdout!.on('data', (d: Buffer) => (out += d.toString()))
  child.stderr!.on('data', (d: Buffer) => (out += d.toString()))
  const url = `http://127.0.0.1:${port}`
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`the server exited with ${child.exitCode}:\n${out}`)
    try {
      if ((await fetch(`${url}/api/health`)).status < 600) break
    } catch {
      // not listening yet
    }
    if (i > 600) throw new Error(`the server did not start within 60 s:\n${out}`)
    await sleep(100)
  }
  return {
    url,
    process: child,
    output: () => out,
    async stop() {
      if (child.pid && child.exitCode === null) {
        process.kill(-child.pid, 'SIGTERM')
        await new Promise((r) => child.once('exit', r))
      }
    },
  }
}

/** A signed-in fetch client against a running server (cookie and CSRF token kept). */
export async function httpClient(url: string, email?: string, password?: string) {
  let cookie = ''
  let csrf = ''
  const call = async (method: string, path: string, body?: FormData | Uint8Array | string | object, headers: Record<string, string> = {}) => {
    const isJson = body !== undefined && !(body instanceof FormData) && !(body instanceof Uint8Array) && typeof body === 'object'
    const res = await fetch(`${url}${path}`, {
      method,
      headers: { ...(cookie ? { cookie } : {}), ...(method !== 'GET' ? { 'x-csrf-token': csrf } : {}), ...(isJson ? { 'content-type': 'application/json' } : {}), ...headers },
      body: isJson ? JSON.stringify(body) : (body as FormData | string | undefined),
    })
    const set = res.headers.getSetCookie().find((c) => c.startsWith('lw.sid='))
    if (set) cookie = set.split(';')[0]!
    return res
  }
  const first = await call('GET', '/api/auth/csrf')
  csrf = ((await first.json()) as { csrfToken: string }).csrfToken
  if (email) {
    const login = await call('POST', '/api/auth/login', { email, password })
    if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`)
    csrf = ((await login.json()) as { csrfToken: string }).csrfToken
  }
  return { call }
}
