// npm run classify -- FILE...: runs the pipeline on each file against the default model library
// and prints one JSON object per file per line.
import { readFileSync } from 'node:fs'
import { basename } from 'node:path'
import { defaultLibrary } from '../jobs/worker'
import { readSpectrum } from '../spectra/io'
import { toSpectrum1D } from '../spectra/io/types'
import { runPipeline } from '../spectra/pipeline'

const files = process.argv.slice(2).filter((a) => a !== '--')
if (files.length === 0) {
  process.stderr.write('usage: npm run classify -- FILE...\n')
  process.exit(2)
}
const library = defaultLibrary()
const r3 = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? null : Math.round(x * 1000) / 1000)

for (const file of files) {
  try {
    const read = readSpectrum(readFileSync(file), basename(file))
    if (!read.ok) {
      console.log(JSON.stringify({ file, ok: false, error: read.message }))
      continue
    }
    const wl = read.spectrum.wavelengthAir
    const out = runPipeline({ spectrum: toSpectrum1D(read.spectrum) }, library)
    const s = out.suggestion!
    console.log(
      JSON.stringify({
        file,
        ok: true,
        pixels: wl.length,
        wavelengthRange: [r3(wl[0]), r3(wl[wl.length - 1])],
        dispersion: r3(medianStep(wl)),
        snr: r3(out.analysis.snr),
        rv: out.analysis.rv ? { v: r3(out.analysis.rv.v), error: r3(out.analysis.rv.error) } : null,
        lines: out.analysis.lines.map((l) =>
          l.measured
            ? { id: l.id, ew: r3(l.equivalentWidth), ewError: r3(l.equivalentWidthError), fwhm: r3(l.fwhm), depth: r3(l.depth), ...(l.family === 'balmer' ? { lorentzianWidth: r3(l.voigt?.lorentzianFwhm) } : {}) }
            : { id: l.id, ew: null, ewError: null, fwhm: null, depth: null, reason: l.reason },
        ),
        spectralType: s.spectralType,
        type: { letter: s.letter, subtype: s.subtype },
        luminosityClass: s.luminosityClass,
        uncertainty: s.uncertainty,
        candidates: s.candidates,
        flags: s.flags,
        libraryVersion: s.libraryVersion.name,
      }),
    )
  } catch (error) {
    console.log(JSON.stringify({ file, ok: false, error: error instanceof Error ? error.message : String(error) }))
  }
}

/** Median pixel step, Å (robust to gaps and to a varying dispersion). */
function medianStep(wl: Float64Array): number {
  const d = new Float64Array(Math.max(0, wl.length - 1))
  for (let i = 1; i < wl.length; i++) d[i - 1] = wl[i]! - wl[i - 1]!
  d.sort()
  return d.length > 0 ? d[d.length >> 1]! : Number.NaN
}
