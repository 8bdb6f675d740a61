import { vi } from 'vitest'

/** A JSON Response as the API would send it. */
export function jsonResponse(status: number, body: unknown): Response {
  return new Response(body === undefined ? null : JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } })
}

export function apiError(status: number, code: string, message: string, details: unknown = null): Response {
  return jsonResponse(status, { error: { code, message, details } })
}

/** Replaces fetch with a queue of answers; returns the mock so a test can read the calls. */
export function mockFetch(...answers: Array<Response | Error>) {
  const fn = vi.fn<(url: string, init?: RequestInit) => Promise<Response>>(async () => {
    const next = answers.shift()
    if (!next) throw new Error('fetch called more often than the test expected')
    if (next instanceof Error) throw next
    return next
  })
  vi.stubGlobal('fetch', fn)
  return fn
}

/** The headers of one recorded fetch call, as a plain object. */
export function headersOf(call: unknown[] | undefined): Record<string, string> {
  const init = (call?.[1] ?? {}) as RequestInit
  return { ...(init.headers as Record<string, string>) }
}

export const flush = () => new Promise<void>((resolve) => setTimeout(resolve, 0))
