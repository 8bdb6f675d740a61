import type { Logger } from 'pino'

const pending = new Set<Promise<unknown>>()

/**
 * Runs work after the response is sent (mail, slow look-ups whose duration would tell the caller
 * something). Failures are logged, never thrown into the request.
 */
export function inBackground(logger: Logger, what: string, work: () => Promise<unknown>): void {
  const p = new Promise<void>((resolve) => setImmediate(resolve))
    .then(work)
    .catch((err: unknown) => logger.error({ err }, `${what} failed`))
    .finally(() => pending.delete(p))
  pending.add(p)
}

/** Resolves once every background job started so far has finished (tests and shutdown). */
export async function settleBackground(): Promise<void> {
  while (pending.size > 0) await Promise.allSettled([...pending])
}
