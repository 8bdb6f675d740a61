// The instrument gate: real reference stars of published type (MILES v9.1, Sánchez-Blázquez et al.
// 2006; types as the library publishes them) passed through a simulated instrument
// (bench/instrument.ts), classified leave one star out with none and with 50 of them promoted as
// the instrument's own standards. The published types are the truth; bench/results/instrument-gate.json
// holds the figures of the last full benchmark (npm run bench:accuracy), and the suggestions may not
// fall more than GATE_MARGIN points below them.
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { GATE_MARGIN } from '../../../../bench/gate'
import { INSTRUMENT_GATE_PROMOTED, instrumentGateFigures, type InstrumentGateFigures } from '../../../../bench/instrument'
import { referenceStars } from '../../../../bench/reference'

const baseline = JSON.parse(readFileSync(new URL('../../../../bench/results/instrument-gate.json', import.meta.url), 'utf8')) as InstrumentGateFigures

describe('accuracy for spectra of an instrument with promoted standards', () => {
  it(`stays within ${GATE_MARGIN} points of the committed baseline with none and with ${INSTRUMENT_GATE_PROMOTED} promoted`, () => {
    const now = instrumentGateFigures(referenceStars(undefined, { fromFiles: false }))
    expect(now.n).toBe(baseline.n)
    for (const k of ['none', 'promoted'] as const) {
      expect(now[k].within1, `${k}, ±1 subtype: ${now[k].within1} % against ${baseline[k].within1} %`).toBeGreaterThanOrEqual(baseline[k].within1 - GATE_MARGIN)
      expect(now[k].exactClass, `${k}, exact class: ${now[k].exactClass} % against ${baseline[k].exactClass} %`).toBeGreaterThanOrEqual(baseline[k].exactClass - GATE_MARGIN)
    }
  }, 900_000)
})
