/** The one fetch wrapper: JSON in and out, same-origin cookies, CSRF token on every non-GET, typed errors. */
import { ErrorBody, fillPath, type Endpoint, type RequestOf, type ResponseOf } from '@shared/api/endpoint'

export interface ApiErrorDetails {
  fields?: Record<string, string>
  [key: string]: unknown
}

/** An error from the API (or from the network, with status 0), built from `{ error: { code, message, details } }`. */
export class ApiError extends Error {
  readonly status: number
  readonly code: string
  readonly details: ApiErrorDetails | null

  constructor(status: number, code: string, message: string, details: ApiErrorDetails | null = null) {
    super(message)
    this.name = 'ApiError'
    this.status = status
    this.code = code
    this.details = details
  }

  /** Per-field messages from a 422 (or a 409 that names a field), keyed by field name. */
  get fields(): Record<string, string> {
    return this.details?.fields ?? {}
  }
}

export const NETWORK_ERROR = 'network_error'
export const NETWORK_MESSAGE = 'Cannot reach the server. Check your connection and try again.'

/** What the app does uniformly with some failures; wired in main.ts so this module stays free of the router and stores. */
export interface HttpHandlers {
  unauthenticated?: (error: ApiError) => void
  forbidden?: (error: ApiError) => void
  unreachable?: (error: ApiError) => void
}

let handlers: HttpHandlers = {}
export function setHttpHandlers(next: HttpHandlers): void {
  handlers = next
}

let csrfToken: string | null = null
let csrfRequest: Promise<string> | null = null

/** Replaces the cached token, e.g. with the one returned by sign-in (the session id changes there). */
export function setCsrfToken(token: string | null): void {
  csrfToken = token
}

async function fetchCsrfToken(): Promise<string> {
  csrfRequest ??= request<{ csrfToken: string }>('GET', '/auth/csrf', undefined, { quiet: true })
    .then((body) => {
      csrfToken = body.csrfToken
      return body.csrfToken
    })
    .finally(() => {
      csrfRequest = null
    })
  return csrfRequest
}

/** The session's CSRF token (cached, fetched once when missing), for requests sent without `http`, e.g. uploads with progress. */
export function currentCsrfToken(): Promise<string> {
  return csrfToken !== null ? Promise.resolve(csrfToken) : fetchCsrfToken()
}

export interface RequestOptions {
  /** Query parameters; undefined values are left out. */
  query?: Record<string, unknown>
  /** Skip the uniform handling (redirect on 401, "not allowed" on 403, network message). */
  quiet?: boolean
  signal?: AbortSignal
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'

function buildUrl(path: string, query?: RequestOptions['query']): string {
  let url = `/api${path}`
  if (query) {
    const params = new URLSearchParams()
    for (const [key, value] of Object.entries(query)) if (value !== undefined && value !== null) params.set(key, String(value))
    const qs = params.toString()
    if (qs) url += `?${qs}`
  }
  return url
}

async function errorFrom(response: Response): Promise<ApiError> {
  let body: unknown = null
  try {
    body = await response.json()
  } catch {
    // Not JSON (a proxy page, an empty body): fall back to the status line.
  }
  const parsed = ErrorBody.safeParse(body)
  if (parsed.success) {
    const { code, message, details } = parsed.data.error
    return new ApiError(response.status, code, message || response.statusText, (details as ApiErrorDetails | null) ?? null)
  }
  return new ApiError(response.status, `http_${response.status}`, response.statusText || `The server answered ${response.status}.`)
}

async function send(method: Method, url: string, body: unknown, options: RequestOptions): Promise<Response> {
  const headers: Record<string, string> = { accept: 'application/json' }
  if (body !== undefined) headers['content-type'] = 'application/json'
  if (method !== 'GET') headers['x-csrf-token'] = csrfToken ?? (await fetchCsrfToken())
  try {
    return await fetch(url, {
      method,
      headers,
      credentials: 'same-origin',
      body: body === undefined ? undefined : JSON.stringify(body),
      signal: options.signal,
    })
  } catch (cause) {
    if ((cause as Error)?.name === 'AbortError') throw cause
    throw new ApiError(0, NETWORK_ERROR, NETWORK_MESSAGE)
  }
}

/** Seconds a 429 or 503 asks to wait (Retry-After in seconds; an HTTP date is read too). */
export function retryAfterSeconds(header: string | null): number | null {
  if (!header) return null
  const seconds = Number(header)
  if (Number.isFinite(seconds) && seconds >= 0) return seconds
  const at = Date.parse(header)
  return Number.isNaN(at) ? null : Math.max(0, (at - Date.now()) / 1000)
}

/** Times a GET answered 503 (the database away for a moment) is sent again, each after its Retry-After, capped. */
const GET_RETRIES_ON_503 = 2
const GET_RETRY_MAX_SECONDS = 3

async function request<T>(method: Method, path: string, body: unknown, options: RequestOptions = {}): Promise<T> {
  const url = buildUrl(path, options.query)
  try {
    let response = await send(method, url, body, options)
    // Reading changes nothing, so a short outage costs a short wait rather than an error on the screen.
    for (let attempt = 0; method === 'GET' && response.status === 503 && attempt < GET_RETRIES_ON_503 && !options.signal?.aborted; attempt++) {
      const seconds = Math.min(retryAfterSeconds(response.headers.get('retry-after')) ?? 1, GET_RETRY_MAX_SECONDS)
      await new Promise((resolve) => setTimeout(resolve, seconds * 1000))
      response = await send(method, url, body, options)
    }
    if (response.status === 403 && method !== 'GET') {
      const error = await errorFrom(response.clone())
      if (error.code === 'csrf_failed') {
        // The session may have changed under us (expiry, another tab): fetch a fresh token and try once more.
        csrfToken = null
        await fetchCsrfToken()
        response = await send(method, url, body, options)
      }
    }
    if (!response.ok) throw await errorFrom(response)
    if (response.status === 204) return undefined as T
    const text = await response.text()
    return (text ? JSON.parse(text) : undefined) as T
  } catch (error) {
    if (error instanceof ApiError && !options.quiet) dispatch(error)
    throw error
  }
}

function dispatch(error: ApiError): void {
  if (error.status === 0) handlers.unreachable?.(error)
  else if (error.status === 401 && error.code !== 'invalid_credentials') handlers.unauthenticated?.(error)
  else if (error.status === 403 && error.code === 'forbidden') handlers.forbidden?.(error)
}

export const http = {
  get: <T>(path: string, options?: RequestOptions) => request<T>('GET', path, undefined, options),
  post: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('POST', path, body ?? {}, options),
  patch: <T>(path: string, body: unknown, options?: RequestOptions) => request<T>('PATCH', path, body, options),
  put: <T>(path: string, body: unknown, options?: RequestOptions) => request<T>('PUT', path, body, options),
  delete: <T>(path: string, options?: RequestOptions) => request<T>('DELETE', path, undefined, options),
}

// Input may be left out when every part of the request is optional.
type CallArgs<E extends Endpoint> = Partial<RequestOf<E>> extends RequestOf<E> ? [input?: RequestOf<E>, options?: CallOptions] : [input: RequestOf<E>, options?: CallOptions]
export type CallOptions = Omit<RequestOptions, 'query'>

/** Calls an endpoint declared in shared/api: the path, query and body are typed by its schemas, and so is the answer. */
export function call<E extends Endpoint>(endpoint: E, ...[input, options = {}]: CallArgs<E>): Promise<ResponseOf<E>> {
  const method = endpoint.method.toUpperCase() as Method
  const body = input?.body ?? (method === 'POST' ? {} : undefined)
  return request<ResponseOf<E>>(method, fillPath(endpoint.path, input?.params as Record<string, unknown> | undefined), body, { ...options, query: input?.query as RequestOptions['query'] })
}

/**
 * GET for a binary body (series data): same cookies, network error and typed API errors as `http`,
 * without the uniform failure handling (a missing series is drawn by the page, not redirected).
 */
export async function getBinary(path: string, options: Pick<RequestOptions, 'query' | 'signal'> = {}): Promise<Response> {
  let response: Response
  try {
    response = await fetch(buildUrl(path, options.query), { credentials: 'same-origin', headers: { accept: 'application/octet-stream' }, signal: options.signal })
  } catch (cause) {
    if ((cause as Error)?.name === 'AbortError') throw cause
    throw new ApiError(0, NETWORK_ERROR, NETWORK_MESSAGE)
  }
  if (!response.ok) throw await errorFrom(response)
  return response
}

/** Field errors from any thrown value (empty unless it is an ApiError that carries them). */
export function fieldErrorsOf(error: unknown): Record<string, string> {
  return error instanceof ApiError ? error.fields : {}
}

/** A message fit for the screen from any thrown value. */
export function messageOf(error: unknown): string {
  if (error instanceof ApiError) return error.message
  return 'Something went wrong. Try again, and tell a lead if it keeps happening.'
}
