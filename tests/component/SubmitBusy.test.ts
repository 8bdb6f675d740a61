import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import { emptyBatchMetadata, useSubmit } from '@/composables/useSubmit'

const uploads: Array<{ name: string }> = []
let busyOnce = new Set<string>()
let inFlight = 0
let mostInFlight = 0
vi.mock('@/api/spectra', async (original) => ({
  ...(await original<typeof import('@/api/spectra')>()),
  uploadSpectrumFile: (_fields: unknown, _file: Blob, name: string) => {
    uploads.push({ name })
    inFlight++
    mostInFlight = Math.max(mostInFlight, inFlight)
    const promise = new Promise((resolve, reject) =>
      setTimeout(() => {
        inFlight--
        if (busyOnce.delete(name)) reject(new ApiError(429, 'too_many_uploads', 'Not now: you already have 2 uploads in progress (at most 2).'))
        else resolve({ results: [{ file: name, outcome: 'refused', code: 'X', message: 'made up' }], accepted: 0, refused: 1 })
      }, 5),
    )
    return { promise, abort: () => undefined }
  },
}))

afterEach(() => {
  uploads.length = 0
  busyOnce = new Set()
  mostInFlight = 0
})

describe('useSubmit', () => {
  it('sends at most two files at a time and puts a file the server is too busy for back in line', async () => {
    busyOnce = new Set(['b.txt'])
    const s = useSubmit({ busyRetryMs: 10 })
    s.add(['a.txt', 'b.txt', 'c.txt', 'd.txt'].map((n) => new File(['x'], n)))
    await s.start({ ...emptyBatchMetadata(), campaignId: 1 })
    expect(mostInFlight).toBe(2)
    expect(uploads.map((u) => u.name).filter((n) => n === 'b.txt')).toHaveLength(2)
    expect(s.items.value.map((i) => i.status)).toEqual(['done', 'done', 'done', 'done'])
  })
})
