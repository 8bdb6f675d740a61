/**
 * Which published classifications may serve as a standard. A standard must stand for one point of
 * the (type, class) grid, so entries whose type string says the star is unusual, uncertain, variable
 * or double are left out, each with the reason written into the library manifest.
 */
import { parseMK } from '../../shared/mk'

export interface ScreenResult {
  /** Canonical MK text of the published type when it is kept. */
  ok: boolean
  reason?: string
  spectralType?: string
  typeCode?: number
  luminosityClass?: string
  classCode?: number
}

/** Suffixes and notes that mark a star as unlike the normal stars of its type (common practice in MK work). */
const PECULIAR_NOTES: readonly [RegExp, string][] = [
  [/var/i, 'variable'],
  [/\.\.\./, 'the published type is truncated'],
  [/\(HB\)/i, 'horizontal-branch star'],
  [/CN|Ba|Fe-|CH/, 'abundance anomaly noted'],
]

/**
 * Screens one published type string. Kept: a normal MK type with a subtype and a luminosity class
 * of at most one step's range (e.g. "IV-V"), classes Ia–V. Left out, with the reason: emission (e),
 * peculiar (p), weak-line (w) and other suffixes, uncertain parts (':' or '?'), composites ('+'),
 * variables, abundance notes, subdwarfs (VI) and hypergiants (Ia+/0), type ranges, classes missing
 * or spanning more than one step, and anything that is not an MK type.
 * @param published the type as the source library publishes it
 * @param flaggedBySource the source's own peculiarity flag, when it has one
 */
export function screenPublishedType(published: string, flaggedBySource = false): ScreenResult {
  const text = published.trim()
  for (const [pattern, reason] of PECULIAR_NOTES) if (pattern.test(text)) return { ok: false, reason }
  const parsed = parseMK(text)
  if (!parsed.ok) return { ok: false, reason: `not MK notation (${parsed.reason})` }
  const v = parsed.value
  if (v.kind !== 'mk') return { ok: false, reason: `not a normal MK type (${v.kind})` }
  if (v.composite) return { ok: false, reason: 'composite spectrum' }
  if (v.uncertain.prefix || v.uncertain.type || v.uncertain.class) return { ok: false, reason: 'uncertain classification' }
  if (v.prefix) return { ok: false, reason: `prefix "${v.prefix}"` }
  if (v.peculiarities.length > 0) return { ok: false, reason: `peculiarity noted (${v.peculiarities.join(', ')})` }
  if (v.lineTypes.length > 0) return { ok: false, reason: 'metallic-line or feature-specific type' }
  if (v.typeCode === undefined || v.typeRange) return { ok: false, reason: v.typeRange ? 'a range of types' : 'no subtype' }
  if (v.classCode === undefined || v.luminosityClass === undefined) return { ok: false, reason: 'no luminosity class' }
  if (v.classCode < 1 || v.classCode > 6) return { ok: false, reason: `luminosity class ${v.luminosityClass} is outside Ia–V` }
  if (v.classRange && Math.abs(v.classRange[1] - v.classRange[0]) > 1) return { ok: false, reason: 'a class range wider than one step' }
  if (flaggedBySource) return { ok: false, reason: 'flagged peculiar by the source library' }
  return { ok: true, spectralType: formatStandardType(v.typeCode, v.luminosityClass), typeCode: v.typeCode, luminosityClass: v.luminosityClass, classCode: v.classCode }
}

function formatStandardType(typeCode: number, luminosityClass: string): string {
  const letter = 'OBAFGKM'[Math.floor(typeCode / 10)]!
  const subtype = Math.round((typeCode - Math.floor(typeCode / 10) * 10) * 10) / 10
  return `${letter}${subtype} ${luminosityClass}`
}

/** Published parameters of a star whose type passed screenPublishedType. */
export interface PublishedParameters {
  teff: number | null
  logg: number | null
  feh: number | null
  typeCode: number
  classCode: number
}

/** Metal-poor boundary, dex (common practice: "metal-poor" below a tenth of solar iron). */
export const METAL_POOR_FEH = -1
/** From A0 on metal lines are part of the type criteria; O and B types rest on helium and hydrogen (common practice). */
export const METAL_LINE_TYPES_FROM = 20
/** Gravity limits, log g in cgs, set loosely so that only clear contradictions go (common practice: dwarfs and subgiants about 3.5–5; giants and supergiants about 0–3.5, B giants up to about 4). */
export const DWARF_MIN_LOGG = 3
export const GIANT_MAX_LOGG = 4.3

/**
 * Screens a standard's published parameters against its published type. The MK system is defined on
 * stars of near-solar composition, so metal-poor stars ([Fe/H] ≤ −1) of types A0 and later, whose
 * weak metal lines give types too early, are left out (the published [Fe/H] of O and B stars is
 * rarely measured from their own lines, and their types rest on helium and hydrogen); so are stars whose published class contradicts their published
 * surface gravity (class IV–V with log g < 3, class III or brighter with log g ≥ 4.3). Returns the
 * reason, or null when the parameters agree with the type or are not given.
 */
export function screenParameters(p: PublishedParameters): string | null {
  if (p.feh !== null && p.feh <= METAL_POOR_FEH && p.typeCode >= METAL_LINE_TYPES_FROM) return `metal-poor ([Fe/H] ${p.feh}): outside the near-solar composition the MK standards are defined on`
  if (p.logg !== null && p.classCode >= 5 && p.logg < DWARF_MIN_LOGG) return `the published class (IV–V) contradicts the published log g ${p.logg}`
  if (p.logg !== null && p.classCode <= 4 && p.logg >= GIANT_MAX_LOGG) return `the published class (III or brighter) contradicts the published log g ${p.logg}`
  return null
}
