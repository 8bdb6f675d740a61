import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import SubmitResultsTable from '@/components/SubmitResultsTable.vue'
import { checkBatchMetadata, countResults, emptyBatchMetadata, resultRows, toSubmitFields, type UploadItem } from '@/composables/useSubmit'

const file = (name: string) => new File(['x'], name)
const items: UploadItem[] = [
  {
    key: 'a',
    file: file('night.zip'),
    status: 'done',
    progress: 1,
    error: null,
    results: [
      {
        file: 'night.zip/kr-1.fits',
        outcome: 'accepted',
        spectrumId: 11,
        pixels: 2000,
        wavelengthRange: [3800, 5200],
        dispersion: 0.7,
        snr: 84.2,
        objectName: 'KR-1',
        notes: [],
        decisions: {
          source: 'HDU 2 (BLUE), image 2000',
          hdu: { index: 2, name: 'BLUE', why: 'the first HDU that covers the classification region (HDU 1 (RED) does not)' },
          wavelengthSolution: 'linear: λ = CRVAL1 + CDELT1 (p − CRPIX1)',
          unit: { unit: 'nm', why: 'CUNIT1' },
          medium: { vacuum: false, why: "AIRORVAC = 'air'", conflict: "the header contradicts itself: AIRORVAC = 'air' says air but CTYPE1 = 'WAVE' says vacuum" },
          masks: [{ source: 'HDU 3 (DQ)', rule: '0 is good, non-zero is bad', pixels: 12 }],
          ignored: ['HDU 1 (RED): another spectrum (5600–6959 Å); pick it with the HDU option'],
          warnings: ["the header contradicts itself: AIRORVAC = 'air' says air but CTYPE1 = 'WAVE' says vacuum"],
        },
      },
      { file: 'night.zip/kr-2.fits', outcome: 'duplicate', spectrumId: 9, message: 'night.zip/kr-2.fits was submitted before (spectrum #9); it is not stored twice.' },
      { file: 'night.zip/notes.txt', outcome: 'refused', code: 'NOT_A_SPECTRUM', message: 'notes.txt has no wavelength and flux columns' },
    ],
  },
  { key: 'b', file: file('huge.fits'), status: 'failed', progress: 0.3, results: [], error: { status: 413, code: 'too_large', message: 'This file is larger than the server accepts.' } },
  { key: 'c', file: file('kr-3.txt'), status: 'uploading', progress: 0.42, results: [], error: null },
  { key: 'd', file: file('kr-4.txt'), status: 'waiting', progress: 0, results: [], error: null },
]

describe('resultRows and countResults', () => {
  it('gives a zip one row per entry and every other upload one row', () => {
    const rows = resultRows(items)
    expect(rows.map((r) => [r.file, r.kind])).toEqual([
      ['night.zip/kr-1.fits', 'accepted'],
      ['night.zip/kr-2.fits', 'duplicate'],
      ['night.zip/notes.txt', 'refused'],
      ['huge.fits', 'failed'],
      ['kr-3.txt', 'uploading'],
      ['kr-4.txt', 'waiting'],
    ])
    expect(rows[2]?.code).toBe('NOT_A_SPECTRUM')
    expect(rows[3]?.message).toBe('This file is larger than the server accepts.')
  })

  it('counts each outcome', () => {
    expect(countResults(resultRows(items))).toEqual({ files: 6, accepted: 1, duplicate: 1, refused: 1, failed: 1, pending: 2 })
  })
})

describe('toSubmitFields and checkBatchMetadata', () => {
  it('sends only what was filled in, and the resolution under the kind chosen', () => {
    const meta = { ...emptyBatchMetadata(), campaignId: 3, objectName: '  KR-7 ', resolutionKind: 'power' as const, resolution: 2000, vMag: 8.1 }
    expect(toSubmitFields(meta, 'b-1')).toEqual({
      campaignId: 3,
      batchId: 'b-1',
      objectName: 'KR-7',
      ra: undefined,
      dec: undefined,
      obsDate: undefined,
      instrument: undefined,
      resolutionFwhm: undefined,
      resolvingPower: 2000,
      vMag: 8.1,
      parallaxMas: undefined,
      parallaxErrorMas: undefined,
      ebv: undefined,
      wavelengthMedium: 'file',
      wavelengthUnit: undefined,
      hdu: undefined,
      aperture: undefined,
      notes: undefined,
    })
  })

  it('asks for a campaign and checks coordinates before sending', () => {
    expect(checkBatchMetadata({ ...emptyBatchMetadata(), ra: '25:00:00', dec: '-91' })).toEqual({
      campaignId: 'choose a campaign',
      ra: 'hours must be below 24, minutes and seconds below 60',
      dec: 'must be between −90 and +90 degrees',
    })
    expect(checkBatchMetadata({ ...emptyBatchMetadata(), campaignId: 1, ra: '14:03:12.5', dec: '+12 30 05' })).toEqual({})
  })
})

describe('SubmitResultsTable', () => {
  const router = createRouter({ history: createMemoryHistory(), routes: [{ path: '/spectra/:id', name: 'spectrum', component: { template: '<div />' } }] })
  const wrapper = mount(SubmitResultsTable, { props: { rows: resultRows(items) }, global: { plugins: [router] } })
  const row = (file: string) => wrapper.get(`[data-testid="submit-result-row"][data-file="${file}"]`)

  it('shows what was read from an accepted file, with links to the spectrum and its edit form', () => {
    const r = row('night.zip/kr-1.fits')
    expect(r.text()).toContain('KR-1')
    expect(r.text()).toContain('3800–5200 Å')
    // S/N at sensible precision: whole numbers from 20 up.
    expect(r.findAll('td.num').map((c) => c.text())).toContain('84')
    expect(r.get('[data-testid="submit-result-link"]').attributes('href')).toBe('/spectra/11')
    expect(r.get('[data-testid="submit-result-edit"]').attributes('href')).toBe('/spectra/11?edit=1')
  })

  it("shows the reader's decisions: HDU, unit, medium and why, masks, parts not used, and what to check", () => {
    const r = row('night.zip/kr-1.fits')
    expect(r.get('[data-testid="read-decision-hdu"]').text()).toBe('HDU 2 (BLUE)')
    expect(r.get('[data-testid="read-decision-hdu"]').attributes('title')).toBe('the first HDU that covers the classification region (HDU 1 (RED) does not)')
    expect(r.get('[data-testid="read-decision-unit"]').text()).toBe('nm')
    expect(r.get('[data-testid="read-decision-medium"]').attributes('title')).toBe("AIRORVAC = 'air'")
    expect(r.get('[data-testid="read-decision-masks"]').text()).toBe('12 px masked')
    expect(r.get('[data-testid="read-decision-ignored"]').text()).toBe('1 part not used')
    expect(r.get('[data-testid="read-decision-warning"]').text()).toMatch(/^the header contradicts itself/)
    expect(r.text()).toContain('HDU 1 (RED): another spectrum (5600–6959 Å); pick it with the HDU option')
  })

  it('links a duplicate to the spectrum already stored, and gives a refusal its code and message', () => {
    expect(row('night.zip/kr-2.fits').get('[data-testid="submit-result-link"]').attributes('href')).toBe('/spectra/9')
    const refused = row('night.zip/notes.txt').get('[data-testid="submit-result-message"]').text()
    expect(refused).toContain('NOT_A_SPECTRUM')
    expect(refused).toContain('no wavelength and flux columns')
  })

  it('labels each state for the eye', () => {
    const labels = wrapper.findAll('[data-testid="submit-result-outcome"]').map((t) => t.text())
    expect(labels).toEqual(['Accepted', 'Already here', 'Refused', 'Not sent', 'Uploading', 'Waiting'])
    expect(row('kr-3.txt').find('[data-testid="submit-result-progress"]').exists()).toBe(true)
  })
})
