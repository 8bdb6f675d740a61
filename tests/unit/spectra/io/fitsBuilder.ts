/** Builds small FITS files in memory for refusal and fuzz cases (FITS Standard 4.0 layout). */
export type Card = [string, string | number | boolean]

function formatCard([key, value]: Card): string {
  let v: string
  if (typeof value === 'boolean') v = (value ? 'T' : 'F').padStart(20)
  else if (typeof value === 'number') v = (Number.isInteger(value) ? String(value) : value.toExponential(12).toUpperCase()).padStart(20)
  else v = `'${value.replace(/'/g, "''").padEnd(8)}'`.padEnd(20)
  return `${key.padEnd(8)}= ${v}`.padEnd(80).slice(0, 80)
}

/** A header of the given cards plus END, padded to 2880-byte blocks. */
export function header(cards: Card[]): Uint8Array {
  let text = cards.map(formatCard).join('') + 'END'.padEnd(80)
  text = text.padEnd(Math.ceil(text.length / 2880) * 2880)
  return new TextEncoder().encode(text)
}

/** Big-endian data padded to a 2880-byte block. */
export function dataFloat32(values: ArrayLike<number>): Uint8Array {
  const out = new Uint8Array(Math.ceil((values.length * 4) / 2880) * 2880)
  const view = new DataView(out.buffer)
  for (let i = 0; i < values.length; i++) view.setFloat32(i * 4, values[i]!)
  return out
}

export function concat(...parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((a, p) => a + p.length, 0))
  let at = 0
  for (const p of parts) {
    out.set(p, at)
    at += p.length
  }
  return out
}

/** A 1-D float32 primary-HDU spectrum with a linear axis. */
export function linearImage(n: number, crval: number, cdelt: number, flux: (i: number) => number, extra: Card[] = []): Uint8Array {
  const values = Array.from({ length: n }, (_, i) => flux(i))
  return concat(header([['SIMPLE', true], ['BITPIX', -32], ['NAXIS', 1], ['NAXIS1', n], ['CRVAL1', crval], ['CDELT1', cdelt], ['CRPIX1', 1], ...extra]), dataFloat32(values))
}
