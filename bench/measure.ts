// Throughput of the numeric core's preparation and measurement on 4000-pixel spectra, per step.
// Run: npx tsx bench/measure.ts
import { pathToFileURL } from 'node:url'
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS } from '../shared/grid'
import { CLASSIFICATION_LINES } from '../shared/lines'
import type { Spectrum1D } from '../shared/spectrum'
import { fitSpectrumContinuum } from '../server/spectra/prepare/continuum'
import { maskSpectrumBadPixels } from '../server/spectra/prepare/mask'
import { rebinSpectrumToLogGrid } from '../server/spectra/prepare/rebin'
import { measureSpectrumRadialVelocity } from '../server/spectra/prepare/rv'
import { smoothSpectrumToFwhm } from '../server/spectra/prepare/smooth'
import { estimateSpectrumSnr } from '../server/spectra/prepare/snr'
import { measureLineRatios, measureSpectrumLines } from '../server/spectra/measure/lines'
import { voigtProfile } from '../server/spectra/measure/voigt'

/** A 4000-pixel A-type spectrum over 3700–7000 Å (0.83 Å pixels) with Balmer and metal lines and noise. */
function benchSpectrum(seed: number, velocity = 0): Spectrum1D {
  const n = 4000
  const wavelength = new Float64Array(n)
  const flux = new Float64Array(n)
  const error = new Float64Array(n)
  let state = seed >>> 0
  const uniform = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0
    return (state + 0.5) / 4294967296
  }
  const lines = CLASSIFICATION_LINES.filter((l) => l.family !== 'band')
  for (let i = 0; i < n; i++) {
    const w = 3700 + (3300 * i) / (n - 1)
    wavelength[i] = w
    const rest = w / (1 + velocity / SPEED_OF_LIGHT_KMS)
    let f = 1
    for (const line of lines) {
      const d = rest - line.wavelength
      if (Math.abs(d) > 80) continue
      f -= line.family === 'balmer' ? 8 * voigtProfile(d, 2.5, 3) : 0.2 * voigtProfile(d, 2.5, 0.1)
    }
    const c = (w / 5000) ** -2
    const noise = Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform())
    flux[i] = c * f + (c / 150) * noise
    error[i] = c / 150
  }
  return { wavelength, flux, error }
}

function perSecond(run: (k: number) => void, minMs = 600): number {
  let count = 0
  const start = performance.now()
  let elapsed = 0
  while (elapsed < minMs) {
    run(count++)
    elapsed = performance.now() - start
  }
  return (count * 1000) / elapsed
}

/** Spectra per second on one core for each step, and for preparation and measurement as a whole. */
export async function runMeasureBench(): Promise<Record<string, number>> {
  const grid = DEFAULT_GRID
  const inputs = Array.from({ length: 8 }, (_, k) => benchSpectrum(k + 1, 40 * k - 150))
  const reference = (() => {
    const r = rebinSpectrumToLogGrid(benchSpectrum(99), { grid })
    return { wavelength: r.wavelength, flux: fitSpectrumContinuum(r).rectified, mask: r.mask! }
  })()
  const masked = inputs.map((s) => maskSpectrumBadPixels(s))
  const rebinned = masked.map((s) => rebinSpectrumToLogGrid(s, { grid }))
  const smoothed = rebinned.map((s) => smoothSpectrumToFwhm(s, { grid, targetFwhm: 3, inputFwhm: 1.5 }))
  const fits = smoothed.map((s) => fitSpectrumContinuum(s))
  const rectified = smoothed.map((s, k) => ({
    wavelength: s.wavelength,
    flux: fits[k]!.rectified,
    error: fits[k]!.rectifiedError!,
    mask: s.mask!,
  }))
  const pick = <T>(list: T[], k: number) => list[k % list.length]!

  const results: Record<string, number> = {
    'mask (spectra/s)': perSecond((k) => maskSpectrumBadPixels(pick(inputs, k))),
    'snr (spectra/s)': perSecond((k) => estimateSpectrumSnr(pick(masked, k), { region: [3850, 5000] })),
    'rebin (spectra/s)': perSecond((k) => rebinSpectrumToLogGrid(pick(masked, k), { grid })),
    'smooth (spectra/s)': perSecond((k) => smoothSpectrumToFwhm(pick(rebinned, k), { grid, targetFwhm: 3, inputFwhm: 1.5 })),
    'continuum (spectra/s)': perSecond((k) => fitSpectrumContinuum(pick(smoothed, k))),
    'rv (spectra/s)': perSecond((k) => measureSpectrumRadialVelocity(pick(rectified, k), reference, { grid, region: [3850, 5000] })),
    'lines without Voigt (spectra/s)': perSecond((k) => measureSpectrumLines(pick(rectified, k), { snr: 150, voigtLineIds: [] })),
    'measurement: lines + Voigt + ratios (spectra/s)': perSecond((k) => measureLineRatios(measureSpectrumLines(pick(rectified, k), { snr: 150, noiseCorrelation: 2, instrumentalFwhm: 3 }))),
  }
  const prepareSeconds = ['mask', 'snr', 'rebin', 'smooth', 'continuum', 'rv'].reduce((s, key) => s + 1 / results[`${key} (spectra/s)`]!, 0)
  results['preparation total (spectra/s)'] = 1 / prepareSeconds
  results['preparation + measurement (spectra/s)'] = 1 / (prepareSeconds + 1 / results['measurement: lines + Voigt + ratios (spectra/s)']!)
  return results
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const results = await runMeasureBench()
  for (const [name, value] of Object.entries(results)) console.log(`${name.padEnd(50)} ${value.toFixed(0)}`)
}
