import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { formatMK, parseMK } from '../../../shared/mk'

// The distinct spectral-type strings of the Hipparcos catalogue, from Debian's stellarium-data
// 0.22.2-1 (see tests/fixtures/catalogue/PROVENANCE.md).
const corpusPath = fileURLToPath(new URL('../../fixtures/catalogue/stars_hip_sp_0v0_4.cat', import.meta.url))
const corpus = readFileSync(corpusPath, 'utf8')
  .split('\n')
  .filter((line) => line.trim() !== '')

const FULL_RANGE = 'a range between two full classifications (type and class on both sides)'
const DASH_NOTE = 'a "-" before a note, which the notation does not define'
const PLUS_NOTE = 'a "+" followed by a note rather than by a companion'
const CAPITALS = 'peculiarity codes written in capitals'
const UNKNOWN = 'a note or symbol the notation does not define'
const TYPO = 'a typing error in the catalogue string'

/** The strings that do not parse, each with why. */
// prettier-ignore
const UNREAD: Record<string, string> = {
  'F5.5Ib-G5Ib:': FULL_RANGE, 'F5e-G2I-II': FULL_RANGE, 'F8V+M2V-M3V': FULL_RANGE, 'G0V+M3V-M6V': FULL_RANGE,
  'G5V+M2V-M4V': FULL_RANGE, 'K7V/M0V': FULL_RANGE, 'M2.5V/M3V': FULL_RANGE, 'M3Iab-M5I': FULL_RANGE,
  'M4e-M6eIII': FULL_RANGE, 'M6S-M7SIII:': FULL_RANGE, 'A1e/F2IIIe': FULL_RANGE, 'S7-8/1e-M7Se': FULL_RANGE,
  'kA0.5hA9.5/kF1hF7': FULL_RANGE,
  'A0Va-lB': DASH_NOTE, 'A1IV-s': DASH_NOTE, 'A3IV-n': DASH_NOTE, 'A1Vp?He-n?': DASH_NOTE, 'B1.5V:e-shell': DASH_NOTE,
  'B6/8VnHe-n': DASH_NOTE, 'kA0hB8V-shell': DASH_NOTE,
  'A1Va+n': PLUS_NOTE, 'A7IV+(n)': PLUS_NOTE, 'K1V+k:': PLUS_NOTE, 'M3III+p': PLUS_NOTE, 'G8III+:+A0.5': PLUS_NOTE,
  'A0P(SI)': CAPITALS, 'A9VP(SRCREU)': CAPITALS, APCR: CAPITALS, 'F1IVM': CAPITALS, 'A9(IIIM)': CAPITALS,
  'A0.5IIIer': UNKNOWN, 'Ahb?': UNKNOWN, Av: UNKNOWN, 'Be*': UNKNOWN, 'S3*4': UNKNOWN, 'F(mdD)': UNKNOWN,
  'F0(mdD)': UNKNOWN, 'F0IVmdD': UNKNOWN, 'F2(mdD)': UNKNOWN, 'FmdD+F': UNKNOWN, FmdD: UNKNOWN, FpHd: UNKNOWN,
  'G5/8w(a)': UNKNOWN, 'G9IIIK-2CH0.5': UNKNOWN, ApSrYZrBa: UNKNOWN, 'B8VsHestr(B6)': UNKNOWN,
  'A3IVwkmet(A1)': UNKNOWN, 'F0Vnnwkmet(A5)': UNKNOWN, 'F1Vwkmet(A9)': UNKNOWN, Ma: UNKNOWN, Mb: UNKNOWN,
  'NV...': UNKNOWN, 'K-R0': UNKNOWN,
  'A2mF0F2': TYPO, 'B3IV-VB4V': TYPO, 'F3.V': TYPO, 'F7+F8VV': TYPO, 'G9+K1IVIV': TYPO, 'WN6+09II-Ib': TYPO,
  'M1III:ep+B0V:IV:': TYPO, 'kA2.8h8.7': TYPO, 'WN8h+B3IV/BH': TYPO, 'SC5.5-C71e': TYPO,
}

const results = corpus.map((text) => ({ text, result: parseMK(text) }))

describe('parseMK on the Hipparcos spectral types', () => {
  it('reads the whole corpus of 6 940 strings (the file has two empty lines more)', () => {
    expect(corpus.length).toBe(6940)
  })

  it('turns at least 99 % of the strings into a structured value', () => {
    const read = results.filter((r) => r.result.ok).length
    expect(read / corpus.length).toBeGreaterThanOrEqual(0.99)
  })

  it('fails on exactly the listed strings, each with a reason', () => {
    const failed = results
      .filter((r) => !r.result.ok)
      .map((r) => r.text)
      .sort()
    expect(failed).toEqual(Object.keys(UNREAD).sort())
    for (const r of results) if (!r.result.ok) expect(r.result.reason.length).toBeGreaterThan(0)
  })

  it('gives every MK type whose ends all have subtypes a type code between O0 and Y9.9', () => {
    for (const { result } of results) {
      if (!result.ok || result.value.kind !== 'mk') continue
      if (result.value.type.points.some((p) => p.subtype === undefined || p.letter === 'OB')) continue
      expect(result.value.typeCode).toBeGreaterThanOrEqual(0)
      expect(result.value.typeCode).toBeLessThan(100)
    }
  })
})

describe('formatMK on the Hipparcos spectral types', () => {
  it('is stable: format(parse(format(parse(s)))) equals format(parse(s)) for every string read', () => {
    const unstable: string[] = []
    for (const { text, result } of results) {
      if (!result.ok) continue
      const once = formatMK(result.value)
      const again = parseMK(once)
      if (!again.ok || formatMK(again.value) !== once) unstable.push(`${text} → ${once}`)
    }
    expect(unstable).toEqual([])
  })

  it('parses its own output back to the same structured value', () => {
    for (const { result } of results) {
      if (!result.ok) continue
      const again = parseMK(formatMK(result.value))
      expect(again.ok && again.value).toEqual(result.value)
    }
  })
})
