import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { signIn } from '@/api/auth'
import { ApiError, NETWORK_ERROR, http, setCsrfToken, setHttpHandlers } from '@/api/http'
import { apiError, headersOf, jsonResponse, mockFetch } from './helpers'

beforeEach(() => {
  setCsrfToken(null)
  setHttpHandlers({})
})
afterEach(() => {
  vi.unstubAllGlobals()
})

describe('http', () => {
  it('builds an ApiError with status, code, message and details from the error shape', async () => {
    mockFetch(apiError(422, 'invalid_input', 'Some fields are not valid.', { fields: { email: 'is not an e-mail address' } }))
    const error = await http.get('/users').catch((e: unknown) => e)
    expect(error).toBeInstanceOf(ApiError)
    expect(error).toMatchObject({ status: 422, code: 'invalid_input', message: 'Some fields are not valid.' })
    expect((error as ApiError).fields).toEqual({ email: 'is not an e-mail address' })
  })

  it('falls back to the status when the body is not the error shape', async () => {
    mockFetch(new Response('<html>bad gateway</html>', { status: 502, statusText: 'Bad Gateway' }))
    await expect(http.get('/users')).rejects.toMatchObject({ status: 502, code: 'http_502', message: 'Bad Gateway' })
  })

  it('turns a failed fetch into a "cannot reach the server" error with status 0', async () => {
    mockFetch(new TypeError('Failed to fetch'))
    const unreachable = vi.fn()
    setHttpHandlers({ unreachable })
    await expect(http.get('/me')).rejects.toMatchObject({ status: 0, code: NETWORK_ERROR, message: expect.stringMatching(/cannot reach the server/i) })
    expect(unreachable).toHaveBeenCalledTimes(1)
  })

  it('fetches the CSRF token once and sends it on every non-GET request, same-origin, as JSON', async () => {
    const fetch = mockFetch(jsonResponse(200, { csrfToken: 'tok-1' }), jsonResponse(200, { ok: 1 }), jsonResponse(200, { ok: 2 }))
    await http.post('/users', { name: 'A' })
    await http.patch('/users/3', { role: 'lead' })
    expect(fetch).toHaveBeenCalledTimes(3)
    expect(fetch.mock.calls[0]?.[0]).toBe('/api/auth/csrf')
    const post = fetch.mock.calls[1] as unknown[]
    expect(post[0]).toBe('/api/users')
    expect(headersOf(post)).toMatchObject({ 'x-csrf-token': 'tok-1', 'content-type': 'application/json' })
    expect((post[1] as RequestInit).credentials).toBe('same-origin')
    expect((post[1] as RequestInit).body).toBe('{"name":"A"}')
    expect(headersOf(fetch.mock.calls[2] as unknown[])['x-csrf-token']).toBe('tok-1')
  })

  it('sends a GET again after a 503, waiting its Retry-After, and gives up after two more tries', async () => {
    const unavailable = () =>
      new Response(JSON.stringify({ error: { code: 'database_unavailable', message: 'The database is unavailable at the moment.', details: null } }), {
        status: 503,
        headers: { 'content-type': 'application/json', 'retry-after': '0' },
      })
    const fetch = mockFetch(unavailable(), jsonResponse(200, { users: [1] }))
    await expect(http.get('/users')).resolves.toEqual({ users: [1] })
    expect(fetch).toHaveBeenCalledTimes(2)

    const again = mockFetch(unavailable(), unavailable(), unavailable())
    await expect(http.get('/users')).rejects.toMatchObject({ status: 503, code: 'database_unavailable' })
    expect(again).toHaveBeenCalledTimes(3)
  })

  it('does not send a POST again after a 503: it may have changed something', async () => {
    setCsrfToken('tok')
    const fetch = mockFetch(new Response(JSON.stringify({ error: { code: 'database_unavailable', message: 'Later.', details: null } }), { status: 503, headers: { 'retry-after': '0' } }))
    await expect(http.post('/users', { name: 'C' })).rejects.toMatchObject({ status: 503 })
    expect(fetch).toHaveBeenCalledTimes(1)
  })

  it('sends no CSRF token with GET requests', async () => {
    const fetch = mockFetch(jsonResponse(200, { users: [] }))
    await http.get('/users', { query: { page: 2, q: undefined } })
    expect(fetch.mock.calls[0]?.[0]).toBe('/api/users?page=2')
    expect(headersOf(fetch.mock.calls[0] as unknown[])['x-csrf-token']).toBeUndefined()
  })

  it('refetches the token and retries once when the server answers csrf_failed', async () => {
    setCsrfToken('stale')
    const fetch = mockFetch(apiError(403, 'csrf_failed', 'The request is missing a valid CSRF token.'), jsonResponse(200, { csrfToken: 'fresh' }), jsonResponse(201, { user: { id: 9 } }))
    const reply = await http.post<{ user: { id: number } }>('/users', { name: 'B' })
    expect(reply.user.id).toBe(9)
    expect(fetch).toHaveBeenCalledTimes(3)
    expect(headersOf(fetch.mock.calls[0] as unknown[])['x-csrf-token']).toBe('stale')
    expect(headersOf(fetch.mock.calls[2] as unknown[])['x-csrf-token']).toBe('fresh')
  })

  it('gives up after one retry when the token is refused again', async () => {
    setCsrfToken('stale')
    const fetch = mockFetch(apiError(403, 'csrf_failed', 'no'), jsonResponse(200, { csrfToken: 'fresh' }), apiError(403, 'csrf_failed', 'still no'))
    await expect(http.post('/users', {})).rejects.toMatchObject({ status: 403, code: 'csrf_failed', message: 'still no' })
    expect(fetch).toHaveBeenCalledTimes(3)
  })

  it('adopts the CSRF token returned by sign-in for the next request', async () => {
    setCsrfToken('before')
    const user = { id: 1, email: 'lead@kestrel-ridge.example', name: 'Maren Olukoya', role: 'lead' }
    const fetch = mockFetch(jsonResponse(200, { user, csrfToken: 'after' }), jsonResponse(200, { csrfToken: 'later' }))
    await signIn('lead@kestrel-ridge.example', 'lead-demo-2026')
    await http.post('/auth/logout')
    expect(headersOf(fetch.mock.calls[1] as unknown[])['x-csrf-token']).toBe('after')
  })

  it('reports a 401 to the unauthenticated handler, but not a wrong password', async () => {
    const unauthenticated = vi.fn()
    setHttpHandlers({ unauthenticated })
    setCsrfToken('t')
    mockFetch(apiError(401, 'session_expired', 'Your session has expired.'), apiError(401, 'invalid_credentials', 'Wrong e-mail address or password.'))
    await expect(http.get('/users')).rejects.toMatchObject({ status: 401 })
    await expect(http.post('/auth/login', {})).rejects.toMatchObject({ code: 'invalid_credentials' })
    expect(unauthenticated).toHaveBeenCalledTimes(1)
    expect(unauthenticated.mock.calls[0]?.[0]).toMatchObject({ code: 'session_expired' })
  })

  it('reports a role refusal to the forbidden handler, and stays quiet when asked to', async () => {
    const forbidden = vi.fn()
    setHttpHandlers({ forbidden })
    mockFetch(apiError(403, 'forbidden', 'Your role does not allow this.'), apiError(403, 'forbidden', 'Your role does not allow this.'))
    await expect(http.get('/users')).rejects.toMatchObject({ status: 403 })
    await expect(http.get('/users', { quiet: true })).rejects.toMatchObject({ status: 403 })
    expect(forbidden).toHaveBeenCalledTimes(1)
  })
})
