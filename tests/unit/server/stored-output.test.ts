// What a processing thread sends back to be stored: the prepared arrays as float32, nothing else of them.
import { serialize } from 'node:v8'
import { describe, expect, it } from 'vitest'
import { DEMO_ENTRIES, DEMO_RESOLUTION_FWHM, demoFits, demoObservation } from '../../../server/db/demo-spectra'
import { forStorage, readLibrarySpec, shareLibrarySpec } from '../../../server/jobs/worker'
import { readSpectrum } from '../../../server/spectra/io'
import { toSpectrum1D } from '../../../server/spectra/io/types'
import { defaultLibrary, type LibrarySpec } from '../../../server/spectra/match/load'
import { runPipeline } from '../../../server/spectra/pipeline'

describe('forStorage', () => {
  it('keeps the stored arrays as float32 (IEEE 754 single rounding, Math.fround) and the rest of the output as it was', () => {
    const entry = DEMO_ENTRIES[0]!
    const read = readSpectrum(demoFits(entry, demoObservation(entry, 11), '2026-01-01T00:00:00'), 'a.fits')
    if (!read.ok) throw new Error('the demo file did not read')
    const output = runPipeline({ spectrum: toSpectrum1D(read.spectrum), inputFwhm: DEMO_RESOLUTION_FWHM }, defaultLibrary())
    const stored = forStorage(output)
    const p = output.analysis.prepared
    for (const name of ['flux', 'continuum', 'rectified'] as const) {
      const a = stored.analysis.prepared[name]
      expect(a).toBeInstanceOf(Float32Array)
      expect(a.length).toBe(p[name].length)
      for (let i = 0; i < a.length; i += 97) expect(Object.is(a[i], Math.fround(p[name][i]!)), `${name}[${i}]`).toBe(true)
    }
    expect(stored.analysis.prepared.mask).toBe(p.mask)
    expect(stored.analysis.prepared.grid).toEqual(p.grid)
    expect(Object.keys(stored.analysis.prepared).sort()).toEqual(['continuum', 'flux', 'grid', 'mask', 'rectified'])
    expect(stored.suggestion).toBe(output.suggestion)
    expect(stored.analysis.lines).toBe(output.analysis.lines)
    // Each of the three arrays is 4 bytes a pixel smaller than as float64.
    expect(serialize(output).length - serialize(stored).length).toBeGreaterThanOrEqual(3 * 4 * p.flux.length)
  }, 60_000)
})

describe('shareLibrarySpec', () => {
  const spec: LibrarySpec = {
    versionId: 7,
    name: 'v7',
    modelDir: '/models',
    models: [{ standardId: 1, modelId: 'A0 V' }],
    observedDir: '/observed',
    templates: [{ standardId: 2, templateId: 'star-2' }],
    observed: [
      {
        standardId: 3,
        spectralType: 'K0 III',
        typeCode: 50,
        luminosityClass: 'III',
        classCode: 3,
        teff: 4800,
        logg: 2.6,
        feh: null,
        origin: 'uploaded spectrum 9',
        rectified: Float32Array.from([0.9, 1, 0.5]),
        resolutionFwhm: 2.5,
        instrumentId: null,
        star: null,
        snr: null,
      },
    ],
  }

  it('reads back the spec it was given, arrays included', () => {
    const back = readLibrarySpec(shareLibrarySpec(spec))
    expect(back).toEqual(spec)
    expect(back.observed[0]!.rectified).toBeInstanceOf(Float32Array)
  })

  it('is shared, not copied, when a task is cloned to a thread (HTML structured clone keeps a SharedArrayBuffer)', () => {
    const shared = shareLibrarySpec(spec)
    const task = structuredClone({ library: shared })
    const copy = new Uint8Array(task.library.bytes)
    copy[0] = copy[0]! ^ 0xff
    expect(new Uint8Array(shared.bytes)[0]).toBe(copy[0])
  })
})
