import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { gridWavelengths } from '../../../shared/grid'
import { analyseSpectrum, type MeasuredLine } from '../../../server/spectra/analyse'
import { loadModelLibrary } from '../../../templates/generator/library'

// The model standards of templates/model-v1, measured by the same code that measures uploads.
const library = loadModelLibrary(fileURLToPath(new URL('../../../templates/model-v1', import.meta.url)), { verify: false })
const wavelength = gridWavelengths(library.grid)

function measure(id: string) {
  const std = library.standards.find((s) => s.entry.id === id)
  if (!std) throw new Error(`no model standard ${id}`)
  const flux = Float64Array.from(std.rectified, (r, i) => r * std.continuum[i]!)
  const result = analyseSpectrum({ wavelength, flux }, { grid: library.grid, inputFwhm: library.manifest.resolutionFwhm })
  const line = (lineId: string) => {
    const l = result.lines.find((x) => x.id === lineId)
    if (!l || !l.measured) throw new Error(`${lineId} not measured in ${id}`)
    return l as MeasuredLine
  }
  return { line }
}

describe('what the measurements show across the model grid', () => {
  it('finds the hydrogen lines strongest near A0–A2 among dwarfs (Hγ + Hδ equivalent widths; common practice)', () => {
    const types = ['B5-V', 'B8-V', 'A0-V', 'A2-V', 'A5-V', 'F0-V', 'F5-V']
    const strength = types.map((t) => {
      const m = measure(t)
      return m.line('h-gamma').equivalentWidth + m.line('h-delta').equivalentWidth
    })
    const peak = types[strength.indexOf(Math.max(...strength))]
    expect(['A0-V', 'A2-V']).toContain(peak)
  })

  it('gives dwarf Balmer lines a larger Lorentzian width than supergiant ones at the same type (Voigt fits of Hβ–Hδ; common practice)', () => {
    for (const type of ['B8', 'A0', 'A2']) {
      const dwarf = measure(`${type}-V`)
      const supergiant = measure(`${type}-Ia`)
      for (const id of ['h-beta', 'h-gamma', 'h-delta']) {
        const d = dwarf.line(id).voigt
        const s = supergiant.line(id).voigt
        expect(d, `${type} V ${id}`).toBeTruthy()
        expect(s, `${type} Ia ${id}`).toBeTruthy()
        expect(d!.lorentzianFwhm, `${type} ${id}`).toBeGreaterThan(s!.lorentzianFwhm)
      }
    }
  })
})
