import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { setCsrfToken, setHttpHandlers } from '@/api/http'
import { claimNext } from '@/composables/useQueue'
import { apiError, jsonResponse, mockFetch } from './helpers'

beforeEach(() => {
  setCsrfToken('tok')
  setHttpHandlers({})
})
afterEach(() => {
  vi.unstubAllGlobals()
})

const item = (spectrumId: number) => ({ spectrumId })
const calls = (fetch: ReturnType<typeof mockFetch>) => fetch.mock.calls.map(([url, init]) => `${(init as RequestInit | undefined)?.method ?? 'GET'} ${String(url).replace(/\?.*/, '')}`)

describe('claimNext', () => {
  it('gives back the item being left and claims only the one being opened', async () => {
    const fetch = mockFetch(new Response(null, { status: 204 }), jsonResponse(200, { item: item(8) }), jsonResponse(200, { claim: {} }))
    expect(await claimNext(5)).toBe(8)
    expect(calls(fetch)).toEqual(['DELETE /api/queue/5/claim', 'GET /api/queue/next', 'POST /api/queue/8/claim'])
  })

  it('stops at the claim limit instead of claiming further down the queue', async () => {
    const fetch = mockFetch(jsonResponse(200, { item: item(8) }), apiError(409, 'too_many_claims', 'You already hold 3 claims (at most 3).'))
    await expect(claimNext(null)).rejects.toMatchObject({ code: 'too_many_claims' })
    expect(calls(fetch)).toEqual(['GET /api/queue/next', 'POST /api/queue/8/claim'])
  })
})
