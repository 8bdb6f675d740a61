/**
 * A flux unit as a unit: the header's text ("erg/cm2/s/A", "10**-17 erg s^-1 cm^-2 Angstrom^-1",
 * "W.m-2.nm-1") turned into "erg s⁻¹ cm⁻² Å⁻¹". Text it cannot read is shown as the file gives it,
 * in quotes, rather than guessed at.
 */

const SUPER: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' }
const sup = (n: number) =>
  String(n)
    .split('')
    .map((c) => SUPER[c] ?? c)
    .join('')

/** Unit words as written in FITS headers and text files → the symbol shown. */
// prettier-ignore
const SYMBOL: Record<string, string> = {
  erg: 'erg', ergs: 'erg', j: 'J', w: 'W', watt: 'W', watts: 'W',
  s: 's', sec: 's', second: 's',
  cm: 'cm', m: 'm', nm: 'nm', um: 'µm', µm: 'µm', micron: 'µm', mm: 'mm',
  a: 'Å', aa: 'Å', å: 'Å', angstrom: 'Å', angstroms: 'Å', ang: 'Å', angs: 'Å',
  hz: 'Hz', jy: 'Jy', mjy: 'mJy', ujy: 'µJy',
  adu: 'ADU', count: 'counts', counts: 'counts', ct: 'counts', cts: 'counts', electron: 'e⁻', electrons: 'e⁻', photon: 'photons', photons: 'photons', sr: 'sr', arcsec2: 'arcsec²',
}
// Quantities (flux per wavelength, per area, per time) come first, the rest in the order given.
const ORDER = ['erg', 'J', 'W', 'photons', 'counts', 'ADU', 'e⁻', 'Jy', 'mJy', 'µJy', 's', 'cm', 'm', 'mm', 'Hz', 'Å', 'nm', 'µm', 'sr', 'arcsec²']

export function formatFluxUnit(raw: string | null | undefined): string | null {
  if (raw == null) return null
  const text = raw.trim()
  if (text === '') return null
  let rest = text
  let scale = ''
  const m = /^\(?\s*(?:10\s*(?:\*\*|\^)\s*\(?\s*([+-]?\d+)\s*\)?|1(?:\.0*)?e([+-]?\d+))\s*\)?\s*[*.]?\s*/i.exec(rest)
  if (m) {
    scale = `10${sup(Number(m[1] ?? m[2]))} `
    rest = rest.slice(m[0].length)
  }
  const powers = new Map<string, number>()
  // "a/b/c" divides by b and c; "a b^-1", "a.b-1", "a*b**-1" give the power with the unit.
  const parts = rest.split('/')
  for (let p = 0; p < parts.length; p++) {
    const tokens = parts[p]!.split(/[\s*.·]+/).filter(Boolean)
    if (tokens.length === 0) return `“${text}”`
    for (const token of tokens) {
      const t = /^([a-zµå]+?)(?:\^|\*\*)?\(?([+-]?\d+)?\)?$/i.exec(token)
      if (!t) return `“${text}”`
      let word = t[1]!.toLowerCase()
      let power = t[2] === undefined ? 1 : Number(t[2])
      // "cm2", "m2" written without a power sign.
      const glued = /^(cm|m|arcsec)(\d)$/.exec(word + (t[2] ?? ''))
      if (glued && t[2] !== undefined && !token.includes('^') && !token.includes('*') && !token.includes('-')) {
        word = glued[1]!
        power = Number(glued[2])
      }
      const symbol = SYMBOL[word]
      if (!symbol) return `“${text}”`
      const sign = p > 0 ? -1 : 1
      powers.set(symbol, (powers.get(symbol) ?? 0) + sign * power)
    }
  }
  const unit = [...powers]
    .filter(([, n]) => n !== 0)
    .sort(([a], [b]) => (ORDER.indexOf(a) === -1 ? 99 : ORDER.indexOf(a)) - (ORDER.indexOf(b) === -1 ? 99 : ORDER.indexOf(b)))
    .map(([u, n]) => (n === 1 ? u : `${u}${sup(n)}`))
    .join(' ')
  return `${scale}${unit}`.trim() || `“${text}”`
}
