import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import { emptyBatchMetadata, takeBatch, useSubmit } from '@/composables/useSubmit'

const requests: string[][] = []
let busyOnce = new Set<string>()
let retryAfter: number | undefined
let inFlight = 0
let mostInFlight = 0
vi.mock('@/api/spectra', async (original) => ({
  ...(await original<typeof import('@/api/spectra')>()),
  uploadSpectrumFiles: (_fields: unknown, files: Array<{ name: string }>) => {
    const names = files.map((f) => f.name)
    requests.push(names)
    inFlight++
    mostInFlight = Math.max(mostInFlight, inFlight)
    const promise = new Promise((resolve, reject) =>
      setTimeout(() => {
        inFlight--
        if (names.some((n) => busyOnce.delete(n))) {
          reject(new ApiError(429, 'upload_allowance_used', 'Not now.', retryAfter === undefined ? null : { retryAfterSeconds: retryAfter }))
          return
        }
        const results = names.flatMap((name): Array<Record<string, unknown>> =>
          name.endsWith('.zip') ? [1, 2].map((k) => ({ file: `${name}/e${k}.txt`, outcome: 'accepted', spectrumId: k })) : [{ file: name, outcome: 'refused', code: 'X', message: 'made up' }],
        )
        resolve({ results, accepted: 0, refused: results.length })
      }, 5),
    )
    return { promise, abort: () => undefined }
  },
}))

afterEach(() => {
  requests.length = 0
  busyOnce = new Set()
  retryAfter = undefined
  mostInFlight = 0
})

const files = (...names: string[]) => names.map((n) => new File(['x'], n))

describe('takeBatch', () => {
  it('takes up to the file and byte limits, never two files of one name, and a zip or a large file alone', () => {
    const line = [...files('a.txt', 'b.txt', 'a.txt', 'c.txt'), new File(['xxxxxxxxxx'], 'big.fits'), ...files('d.zip', 'e.txt')].map((file) => ({ file }))
    const names = () => takeBatch(line, 3, 32).map((i) => i.file.name)
    expect(names()).toEqual(['a.txt', 'b.txt'])
    expect(names()).toEqual(['a.txt', 'c.txt'])
    expect(names()).toEqual(['big.fits'])
    expect(names()).toEqual(['d.zip'])
    expect(names()).toEqual(['e.txt'])
    expect(names()).toEqual([])
  })
})

describe('useSubmit', () => {
  it('sends several files per request, two requests at a time, and gives each file its own result', async () => {
    const s = useSubmit({ busyRetryMs: 10, batchFiles: 3 })
    s.add(files('a.txt', 'b.txt', 'c.txt', 'd.txt', 'e.txt', 'f.txt', 'g.txt', 'pack.zip'))
    await s.start({ ...emptyBatchMetadata(), campaignId: 1 })
    expect(requests.map((r) => r.length).sort()).toEqual([1, 1, 3, 3])
    expect(mostInFlight).toBe(2)
    expect(s.items.value.map((i) => i.results.map((r) => r.file))).toEqual([['a.txt'], ['b.txt'], ['c.txt'], ['d.txt'], ['e.txt'], ['f.txt'], ['g.txt'], ['pack.zip/e1.txt', 'pack.zip/e2.txt']])
  })

  it('puts a batch the server is too busy for back in line and waits as long as Retry-After says', async () => {
    busyOnce = new Set(['b.txt'])
    retryAfter = 0.3
    const s = useSubmit({ busyRetryMs: 10_000, batchFiles: 2, parallel: 1 })
    s.add(files('a.txt', 'b.txt', 'c.txt'))
    const started = Date.now()
    await s.start({ ...emptyBatchMetadata(), campaignId: 1 })
    const took = Date.now() - started
    expect(requests).toEqual([['a.txt', 'b.txt'], ['a.txt', 'b.txt'], ['c.txt']])
    expect(took).toBeGreaterThanOrEqual(290)
    expect(took).toBeLessThan(5000)
    expect(s.items.value.map((i) => i.status)).toEqual(['done', 'done', 'done'])
  })
})
