import { formatWithUncertainty } from '@shared/rounding'

/** How the line tables read the measurements: one place for the words and the checks. */

/** The sign convention printed with every equivalent-width column. */
export const EW_CONVENTION =
  'EW > 0 is absorption (the line dips below the continuum, depth > 0); EW < 0 means the window lies above its side bands: emission, or in G–M stars side bands pulled down by metal lines and bands.'

/** What a masked pixel is, printed under the line tables. */
export const MASKED_NOTE =
  'Masked pixels are set aside before measuring: flux that is not a number, a zero or negative error, pixels the file flags as bad, and wavelengths the spectrum does not cover. A line is measured only when at most a fifth of its window and of each side band is masked.'

/** "1.23 ± 0.05" rounded to the uncertainty; never "± 0.00". */
export function ewText(ew: number | null, err: number | null): string {
  if (ew === null || !Number.isFinite(ew)) return '—'
  return formatWithUncertainty(ew, err, 2)
}

/**
 * A plain reason for a line that was not measured. Stored reasons read "code: detail"; a line whose
 * bands are wholly masked because they lie beyond the data says so instead of quoting percentages.
 */
export function lineReasonText(reason: string | null, wavelength: number, observed: readonly [number, number] | null): string {
  if (!reason) return 'not measured (no reason stored)'
  const [code, ...rest] = reason.split(': ')
  const detail = rest.join(': ')
  const outside = observed !== null && (wavelength < observed[0] || wavelength > observed[1])
  if (code === 'outside-coverage' || outside || (code === 'masked-pixels' && /^100 %/.test(detail))) return 'outside the observed range'
  if (code === 'masked-pixels') return `${detail} (masked pixels: see the note below)`
  if (code === 'low-snr') return detail ? `S/N too low here: ${detail}` : 'S/N too low here'
  if (code === 'no-continuum') return 'no continuum beside the line (a side band has no positive flux)'
  return detail || code || reason
}

/**
 * The narrowest line the spectrum can show: λ / R where the resolving power is known, else two
 * pixels (the sampling limit, Nyquist; common practice). Null when neither is known.
 */
export function resolutionFwhm(wavelength: number, resolvingPower: number | null | undefined, dispersion: number | null | undefined): number | null {
  if (resolvingPower != null && resolvingPower > 0) return wavelength / resolvingPower
  if (dispersion != null && dispersion > 0) return 2 * dispersion
  return null
}

/** A note for a FWHM below the resolution (10 % leeway for the measurement's own noise), else null. */
export function fwhmFlag(fwhm: number | null, limit: number | null): string | null {
  if (fwhm === null || limit === null || !Number.isFinite(fwhm)) return null
  return fwhm < 0.9 * limit ? `narrower than the resolution (${limit.toFixed(2)} Å): noise or a blend, not a real width` : null
}

/** A note when the EW's sign and the depth's sign disagree (a window on a slope or a noise spike). */
export function signFlag(ew: number | null, depth: number | null): string | null {
  if (ew === null || depth === null || Math.abs(ew) < 1e-9 || Math.abs(depth) < 1e-9) return null
  return Math.sign(ew) !== Math.sign(depth) ? 'EW and depth disagree in sign: read this line by eye' : null
}
