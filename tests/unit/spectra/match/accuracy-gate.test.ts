// The accuracy gate: real reference stars of published type (MILES v9.1, Sánchez-Blázquez et al.
// 2006; JHC, Jacoby, Hunter & Christian 1984; types as the libraries publish them), classified leave
// one star out. The published types are the truth; bench/results/accuracy-gate.json holds the
// figures of the last full benchmark (npm run bench:accuracy), and the suggestions may not fall more
// than GATE_MARGIN points below them.
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { defaultLibrary } from '../../../../server/spectra/match/load'
import { GATE_MARGIN, gateFigures, type GateFigures } from '../../../../bench/gate'

const baseline = JSON.parse(readFileSync(new URL('../../../../bench/results/accuracy-gate.json', import.meta.url), 'utf8')) as GateFigures

describe('accuracy on real stars left out of the library', () => {
  it(`stays within ${GATE_MARGIN} points of the committed baseline (types within ±1 subtype, exact class)`, () => {
    const now = gateFigures(defaultLibrary())
    expect(now.n).toBe(baseline.n)
    expect(now.within1, `±1 subtype: ${now.within1} % against ${baseline.within1} %`).toBeGreaterThanOrEqual(baseline.within1 - GATE_MARGIN)
    expect(now.exactClass, `exact class: ${now.exactClass} % against ${baseline.exactClass} %`).toBeGreaterThanOrEqual(baseline.exactClass - GATE_MARGIN)
  }, 300_000)
})
