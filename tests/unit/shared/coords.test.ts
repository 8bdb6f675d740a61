import { describe, expect, it } from 'vitest'
import { formatDeclination, formatRightAscension, parseDeclination, parseRightAscension } from '../../../shared/coords'

// 1 h of right ascension = 15°, 1° = 60′ = 3600″ (common practice).
describe('parseRightAscension', () => {
  it('reads hours, minutes and seconds in the usual spellings', () => {
    for (const text of ['14:03:12.6', '14h03m12.6s', '14 03 12.6']) {
      const r = parseRightAscension(text)
      expect(r.ok && r.degrees).toBeCloseTo(15 * (14 + 3 / 60 + 12.6 / 3600), 9)
    }
  })
  it('reads decimal degrees', () => {
    expect(parseRightAscension('210.8025')).toEqual({ ok: true, degrees: 210.8025 })
  })
  it('refuses 24 hours or more, 360 degrees or more, and junk', () => {
    expect(parseRightAscension('24:00:00').ok).toBe(false)
    expect(parseRightAscension('360').ok).toBe(false)
    expect(parseRightAscension('north-ish').ok).toBe(false)
    expect(parseRightAscension('').ok).toBe(false)
  })
})

describe('parseDeclination', () => {
  it('reads signed sexagesimal declinations', () => {
    const r = parseDeclination('-12:30:36')
    expect(r.ok && r.degrees).toBeCloseTo(-12.51, 9)
    const s = parseDeclination('+05°07′30″')
    expect(s.ok && s.degrees).toBeCloseTo(5.125, 9)
  })
  it('refuses values beyond the poles', () => {
    expect(parseDeclination('91').ok).toBe(false)
    expect(parseDeclination('-90:00:01').ok).toBe(false)
  })
})

describe('formatRightAscension and formatDeclination', () => {
  it('round-trip through the parsers to the precision they print', () => {
    const ra = parseRightAscension(formatRightAscension(210.8025))
    expect(ra.ok && ra.degrees).toBeCloseTo(210.8025, 3)
    const dec = parseDeclination(formatDeclination(-12.51))
    expect(dec.ok && dec.degrees).toBeCloseTo(-12.51, 4)
    expect(formatDeclination(-0.5)).toBe('-00:30:00.0')
  })
})
