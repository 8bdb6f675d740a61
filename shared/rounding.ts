/**
 * Rounding a value to its uncertainty, as tables of measurements are written (common practice:
 * the uncertainty to two significant figures, the value to the same decimal place).
 */

/** Decimal places that give `err` two significant figures (0 when err ≥ 10); null for no usable error. */
export function decimalsForUncertainty(err: number | null | undefined, significant = 2, max = 6): number | null {
  if (err == null || !Number.isFinite(err) || err <= 0) return null
  const d = significant - 1 - Math.floor(Math.log10(err))
  return Math.max(0, Math.min(max, d))
}

/** The value rounded to the decimal place of its uncertainty (or left as it is without one). */
export function roundToUncertainty(value: number, err: number | null | undefined, significant = 2): number {
  const d = decimalsForUncertainty(err, significant)
  if (d === null || !Number.isFinite(value)) return value
  return Number(value.toFixed(d))
}

/** "0.42 ± 0.03", "1234 ± 56"; the value alone when the error is missing or zero. */
export function formatWithUncertainty(value: number, err: number | null | undefined, fallbackDecimals = 2): string {
  const d = decimalsForUncertainty(err)
  if (d === null) return value.toFixed(fallbackDecimals)
  return `${value.toFixed(d)} ± ${err!.toFixed(d)}`
}

/** `x` rounded to `digits` decimals; non-finite values pass through. */
export const roundTo = (x: number, digits: number): number => (Number.isFinite(x) ? Math.round(x * 10 ** digits) / 10 ** digits : x)
