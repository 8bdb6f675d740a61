// Which published classifications may serve as standards (templates/observed/screen.ts), and the
// shipped library's manifest checked against the same rules.
import { describe, expect, it } from 'vitest'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../../../server/spectra/match/load'
import { screenParameters, screenPublishedType } from '../../../templates/observed/screen'

describe('screenPublishedType', () => {
  it('keeps normal MK types and one-step class ranges (MK notation, common practice)', () => {
    expect(screenPublishedType('G8 III')).toMatchObject({ ok: true, spectralType: 'G8 III', typeCode: 48, classCode: 4 })
    expect(screenPublishedType('F6 IV-V').ok).toBe(true)
  })

  it('leaves out peculiar, uncertain, composite and variable entries, with the reason', () => {
    expect(screenPublishedType('A0 Vp').ok).toBe(false)
    expect(screenPublishedType('K0 III:').reason).toBe('uncertain classification')
    expect(screenPublishedType('A0 V + K0 III').ok).toBe(false)
    expect(screenPublishedType('M5 III var').reason).toBe('variable')
    expect(screenPublishedType('G8 III', true).reason).toBe('flagged peculiar by the source library')
  })
})

describe('screenParameters', () => {
  it('leaves out metal-poor stars: the MK standards are stars of near-solar composition (common practice)', () => {
    // HD 122563, a well-known very metal-poor giant ([Fe/H] ≈ −2.6; from memory), once typed F8 IV.
    expect(screenParameters({ teff: 4566, logg: 1.12, feh: -2.63, typeCode: 38, classCode: 5 })).toMatch(/metal-poor/)
    expect(screenParameters({ teff: 5900, logg: 4.3, feh: -1, typeCode: 40, classCode: 6 })).toMatch(/metal-poor/)
    expect(screenParameters({ teff: 5900, logg: 4.3, feh: -0.9, typeCode: 40, classCode: 6 })).toBeNull()
    // B types rest on helium and hydrogen lines (common practice): a low published [Fe/H] does not count.
    expect(screenParameters({ teff: 13000, logg: 4, feh: -1.1, typeCode: 18, classCode: 4 })).toBeNull()
  })

  it('leaves out a class that contradicts the surface gravity (dwarfs log g ≈ 4–4.6, giants ≲ 3.5; common practice)', () => {
    expect(screenParameters({ teff: 4700, logg: 1.6, feh: 0, typeCode: 48, classCode: 5 })).toMatch(/class \(IV–V\)/)
    expect(screenParameters({ teff: 5344, logg: 4.7, feh: 0, typeCode: 50, classCode: 4 })).toMatch(/III or brighter/)
    // A B giant near log g 3.9 is normal (common practice).
    expect(screenParameters({ teff: 15000, logg: 3.9, feh: 0, typeCode: 15, classCode: 4 })).toBeNull()
    expect(screenParameters({ teff: null, logg: null, feh: null, typeCode: 30, classCode: 1 })).toBeNull()
  })
})

describe('the shipped observed library', () => {
  const { library } = observedLibraryAt(DEFAULT_OBSERVED_DIR)

  it('has no standard whose published parameters contradict its type', () => {
    for (const s of library.standards) expect(screenParameters(s.entry), s.entry.id).toBeNull()
  })

  it('keeps the rows of the standards it retired, with the version that retired them and why', () => {
    expect(library.retired.length).toBeGreaterThan(0)
    for (const s of library.retired) {
      expect(s.entry.retiredIn).toBe(library.manifest.version)
      expect(s.entry.excludedBecause).toBeTruthy()
      expect(Number.isFinite(s.flux[3000]!)).toBe(true)
    }
    expect(library.manifest.earlierVersions).toContain('observed-v1')
  })
})
