/** Number formats for spectra, used by the observer's screens and the review screens alike. */

const dash = '—'

export const fmtNumber = (v: number | null | undefined, digits = 1): string => (v == null || !Number.isFinite(v) ? dash : v.toFixed(digits))

/** "3800–5200 Å". */
export function fmtRange(range: readonly [number, number] | null | undefined): string {
  if (!range) return dash
  return `${Math.round(range[0])}–${Math.round(range[1])} Å`
}

/** Å per pixel with sensible digits: 0.0250, 0.512, 1.25. */
export function fmtDispersion(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v) || v <= 0) return dash
  return v < 0.1 ? v.toFixed(4) : v < 1 ? v.toFixed(3) : v.toFixed(2)
}

/** S/N cap: above it the noise estimate is meaningless (noiseless or model data), so "> 1000" is shown. */
export const SNR_CAP = 1000

/** "42", "8.5", "> 1000": whole numbers from 20 up, one decimal below, a cap for noiseless data. */
export const fmtSnr = (v: number | null | undefined): string => (v == null || !Number.isFinite(v) || v < 0 ? dash : v >= SNR_CAP ? `> ${SNR_CAP}` : v >= 20 ? Math.round(v).toString() : v.toFixed(1))

/** "12.3 kB", "4.1 MB". */
export function fmtBytes(n: number | null | undefined): string {
  if (n == null || !Number.isFinite(n)) return dash
  if (n < 1024) return `${n} B`
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} kB`
  return `${(n / 1024 / 1024).toFixed(1)} MB`
}

/** "0.42 ± 0.03". */
export function fmtPlusMinus(v: number | null | undefined, err: number | null | undefined, digits = 2): string {
  if (v == null || !Number.isFinite(v)) return dash
  return err == null || !Number.isFinite(err) ? v.toFixed(digits) : `${v.toFixed(digits)} ± ${err.toFixed(digits)}`
}

/** The date part of an ISO time in UTC, as observers log it: "2026-03-14 02:10". */
export function fmtUtc(iso: string | null | undefined): string {
  if (!iso) return dash
  const d = new Date(iso)
  return Number.isNaN(d.getTime()) ? dash : `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`
}
