import type { Spectrum1D } from '../../../shared/spectrum'

/**
 * Checks the shape of a spectrum before any numeric step touches it: lengths agree, there are
 * enough pixels, and wavelengths are finite and strictly ascending. Flux values may be NaN (they
 * are masked, not refused).
 *
 * @param minPixels - fewest pixels the calling step can work with. @default 1
 * @throws Error with one of the messages tested in tests/unit/spectra/prepare/guards.test.ts
 */
export function assertSpectrum(spectrum: Spectrum1D, minPixels = 1): void {
  const n = spectrum.wavelength.length
  if (spectrum.flux.length !== n) {
    throw new Error(`flux has ${spectrum.flux.length} values but wavelength has ${n}`)
  }
  if (spectrum.error && spectrum.error.length !== n) {
    throw new Error(`error has ${spectrum.error.length} values but wavelength has ${n}`)
  }
  if (spectrum.mask && spectrum.mask.length !== n) {
    throw new Error(`mask has ${spectrum.mask.length} values but wavelength has ${n}`)
  }
  if (n === 0) throw new Error('spectrum is empty')
  if (n < minPixels) throw new Error(`spectrum has ${n} pixel${n === 1 ? '' : 's'}; at least ${minPixels} are needed`)
  const w = spectrum.wavelength
  for (let i = 0; i < n; i++) {
    const x = w[i]!
    if (!Number.isFinite(x) || (i > 0 && !(x > w[i - 1]!))) {
      throw new Error(`wavelength must be finite and strictly ascending (pixel ${i})`)
    }
  }
}

/** True when pixel i is usable: unmasked with a finite flux. */
export function isGoodPixel(spectrum: Spectrum1D, i: number): boolean {
  return (spectrum.mask === undefined || spectrum.mask[i] === 0) && Number.isFinite(spectrum.flux[i]!)
}
