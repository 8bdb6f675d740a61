import { ConnectionError } from 'sequelize'

/** Driver error codes that mean "no usable connection", not "this query is wrong". */
const CONNECTION_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'EPIPE',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'PROTOCOL_CONNECTION_LOST',
  'ER_GET_CONNECTION_TIMEOUT',
  'ER_CONNECTION_TIMEOUT',
  'ER_SOCKET_UNEXPECTED_CLOSE',
  'ER_CONNECTION_ALREADY_CLOSED',
  'ER_CMD_CONNECTION_CLOSED',
  'ER_SERVER_SHUTDOWN',
  'ER_CONNECTION_KILLED',
  'ER_POOL_ALREADY_CLOSED',
  'ER_SOCKET_TIMEOUT',
])

/** True when the error says the database cannot be reached (down, restarting, connection lost). */
export function isDatabaseUnavailable(error: unknown): boolean {
  for (let e = error as { code?: string; errno?: number; fatal?: boolean; parent?: unknown; original?: unknown } | undefined, depth = 0; e && depth < 4; depth++) {
    if (e instanceof ConnectionError) return true
    if (typeof e.code === 'string' && CONNECTION_CODES.has(e.code)) return true
    // 1053 server shutdown in progress, 2006/2013 server gone away / lost during query.
    if (e.errno === 1053 || e.errno === 2006 || e.errno === 2013) return true
    e = (e.parent ?? e.original) as typeof e
  }
  return false
}

/** MariaDB errors that a second try usually gets past: deadlock (1213) and lock wait timeout (1205). */
export function isTransient(error: unknown): boolean {
  for (let e = error as { errno?: number; parent?: unknown; original?: unknown } | undefined, depth = 0; e && depth < 4; depth++) {
    if (e.errno === 1213 || e.errno === 1205) return true
    e = (e.parent ?? e.original) as typeof e
  }
  return isDatabaseUnavailable(error)
}

/**
 * Runs `work` again after a deadlock, a lock wait timeout or a lost connection, waiting a little
 * longer each time with some randomness so that two writers that collided do not collide again.
 */
export async function withRetry<T>(work: () => Promise<T>, options: { tries?: number; baseMs?: number } = {}): Promise<T> {
  const tries = options.tries ?? 5
  const base = options.baseMs ?? 50
  for (let attempt = 1; ; attempt++) {
    try {
      return await work()
    } catch (error) {
      if (attempt >= tries || !isTransient(error)) throw error
      const wait = base * 2 ** (attempt - 1) * (0.5 + Math.random())
      await new Promise((r) => setTimeout(r, wait))
    }
  }
}
