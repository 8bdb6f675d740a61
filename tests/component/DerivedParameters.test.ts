import { flushPromises, mount } from '@vue/test-utils'
import { afterEach, describe, expect, it, vi } from 'vitest'
import DerivedParameters from '@/components/DerivedParameters.vue'
import { jsonResponse, mockFetch } from './helpers'

const estimate = (value: number, uncertainty: number) => ({ value, uncertainty, fromClassification: uncertainty, calibrationScatter: 0 })
const CAUTION = 'Calibration estimates, not measurements: derived from the MK type and class with published calibrations.'

afterEach(() => {
  vi.unstubAllGlobals()
})

describe('DerivedParameters', () => {
  it('quotes each estimate rounded to its uncertainty, with the caution and the classification it rests on', async () => {
    const fetch = mockFetch(
      jsonResponse(200, {
        derived: {
          spectrumId: 7,
          basis: { source: 'classification', spectralType: 'B2 V', typeUncertainty: 0.5, classUncertainty: 0.5 },
          inputs: { vMag: 8.1, ebv: null, parallaxMas: null, parallaxErrorMas: null },
          estimates: {
            ok: true,
            sources: { teff: 'Teff scale', absoluteMagnitudeV: 'M_V scale', bolometricCorrectionV: 'BC scale' },
            teff: estimate(20600, 3064),
            absoluteMagnitudeV: estimate(-2.46, 0.58),
            bolometricCorrectionV: estimate(-1.9577, 0.329),
            absoluteBolometricMagnitude: estimate(-4.41, 0.83),
            luminositySolar: estimate(4561, 3992),
            radiusSolar: estimate(5.302, 1.218),
            spectroscopicDistancePc: estimate(1288.2, 358.6),
            av: 0,
          },
          caution: CAUTION,
        },
      }),
    )
    const w = mount(DerivedParameters, { props: { spectrumId: 7 } })
    await flushPromises()
    expect(fetch.mock.calls[0]?.[0]).toBe('/api/spectra/7/derived')
    expect(w.get('[data-testid="derived-teff"]').text()).toContain('21,000 K± 3,000')
    expect(w.get('[data-testid="derived-mv"]').text()).toContain('−2.5 mag± 0.6')
    expect(w.get('[data-testid="derived-bc"]').text()).toContain('−2.0 mag± 0.3')
    expect(w.get('[data-testid="derived-lum"]').text()).toContain('5,000 L☉± 4,000')
    expect(w.get('[data-testid="derived-radius"]').text()).toContain('5.3 R☉± 1.2')
    expect(w.get('[data-testid="derived-dist"]').text()).toContain('1,300 pc± 400')
    expect(w.find('[data-testid="derived-plx"]').exists()).toBe(false)
    expect(w.get('[data-testid="derived-caution"]').text()).toContain(CAUTION)
    expect(w.get('[data-testid="derived-basis"]').text()).toContain('B2 V')
  })

  it('says when the classification is outside the MK grid, and derives nothing', async () => {
    mockFetch(
      jsonResponse(200, {
        derived: {
          spectrumId: 8,
          basis: { source: 'classification', spectralType: 'DA3', typeUncertainty: 0.5, classUncertainty: 0.5 },
          inputs: { vMag: null, ebv: null, parallaxMas: null, parallaxErrorMas: null },
          estimates: { ok: false, flag: 'outside the MK grid', reason: 'a white-dwarf type has no MK calibration' },
          caution: CAUTION,
        },
      }),
    )
    const w = mount(DerivedParameters, { props: { spectrumId: 8 } })
    await flushPromises()
    const alert = w.get('[data-testid="derived-outside-grid"]')
    expect(alert.text()).toContain('Outside the MK grid')
    expect(alert.text()).toContain('DA3: a white-dwarf type has no MK calibration')
    expect(w.find('[data-testid="derived-teff"]').exists()).toBe(false)
  })

  it('says there is nothing to derive from before a classification or suggestion exists', async () => {
    mockFetch(jsonResponse(200, { derived: { spectrumId: 9, basis: null, inputs: { vMag: null, ebv: null, parallaxMas: null, parallaxErrorMas: null }, estimates: null, caution: CAUTION } }))
    const w = mount(DerivedParameters, { props: { spectrumId: 9 } })
    await flushPromises()
    expect(w.get('[data-testid="derived-none"]').text()).toContain('nothing to derive from')
  })
})
