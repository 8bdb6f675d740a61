import { describe, expect, it } from 'vitest'
import { listQueryParams } from '@/api/spectra'
import { emptySpectraFilters, spectraQuery } from '@/composables/useSpectra'

describe('spectraQuery and listQueryParams', () => {
  it('sends only the page, size and sort when no filter is set', () => {
    expect(listQueryParams(spectraQuery(1, 25, '-createdAt', emptySpectraFilters()))).toEqual({ page: 1, pageSize: 25, sort: '-createdAt' })
  })

  it('turns every filter into its query parameter, the date range ending with its last day', () => {
    const from = Date.UTC(2026, 2, 1)
    const to = Date.UTC(2026, 2, 14)
    const query = spectraQuery(3, 50, 'snr', { status: 'failed', campaign: 2, instrument: 5, q: '  KR-04 ', submitted: [from, to], snrMin: 20, snrMax: 150 })
    expect(listQueryParams(query)).toEqual({
      page: 3,
      pageSize: 50,
      sort: 'snr',
      status: 'failed',
      campaign: 2,
      instrument: 5,
      q: 'KR-04',
      from: '2026-03-01T00:00:00.000Z',
      to: '2026-03-14T23:59:59.999Z',
      snrMin: 20,
      snrMax: 150,
    })
  })

  it('leaves out a blank search and an S/N bound of zero is still sent', () => {
    expect(listQueryParams(spectraQuery(1, 25, '-createdAt', { ...emptySpectraFilters(), q: '   ', snrMin: 0 }))).toEqual({ page: 1, pageSize: 25, sort: '-createdAt', snrMin: 0 })
  })
})
