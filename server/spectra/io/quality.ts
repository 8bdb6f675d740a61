/**
 * Quality and mask columns, rows and extensions, read by the convention their name (and comment)
 * declares. The flags are proposed, not imposed: finalize.ts applies a set only when it leaves the
 * spectrum usable, and says so when it does not.
 */

/** Pixel flags from one quality source, 1 = bad, with the rule that made them. */
export interface FlagSet {
  source: string
  rule: string
  flags: Uint8Array
}

/** Names of quality columns/extensions, matched case-insensitively. */
export const QUALITY_NAMES = ['AND_MASK', 'ANDMASK', 'OR_MASK', 'ORMASK', 'DATAQUAL', 'QUAL', 'QUALITY', 'DQ', 'MASK', 'FLAG', 'FLAGS', 'BPM', 'PIXMASK', 'PIXEL_MASK', 'BADPIX']

const GOOD_IS_ONE = /\b1\s*=\s*good\b|\bgood\s*=\s*1\b/i
const GOOD_IS_ZERO = /\b0\s*=\s*good\b|\bgood\s*=\s*0\b/i

/**
 * The flags of a quality source by its convention:
 * - AND_MASK / OR_MASK (survey pixel masks, SDSS data model): non-zero is bad;
 * - DATAQUAL: what its comment says ("1=good, 0=bad" in HST CALSPEC tables); without a comment,
 *   the CALSPEC convention 1 = good;
 * - QUAL, QUALITY, DQ, FLAGS, BPM, MASK (ESO, HST DQ, common practice): 0 is good, non-zero bad,
 *   unless the comment says 1 = good; a logical MASK is true where bad (numpy's masked arrays).
 * NaN values flag nothing (they say nothing about the pixel).
 */
export function qualityFlags(name: string, comment: string | undefined, values: Float64Array, logical: boolean): FlagSet {
  const key = name.trim().toUpperCase()
  const flags = new Uint8Array(values.length)
  const label = name.trim()
  let goodIsOne: boolean
  let rule: string
  if (key === 'AND_MASK' || key === 'ANDMASK' || key === 'OR_MASK' || key === 'ORMASK') {
    goodIsOne = false
    rule = 'non-zero is bad (survey pixel-mask convention)'
  } else if (comment && GOOD_IS_ONE.test(comment)) {
    goodIsOne = true
    rule = `0 is bad, 1 is good (as its comment says: "${comment.trim()}")`
  } else if (comment && GOOD_IS_ZERO.test(comment)) {
    goodIsOne = false
    rule = `non-zero is bad (as its comment says: "${comment.trim()}")`
  } else if (key === 'DATAQUAL') {
    goodIsOne = true
    rule = '0 is bad, 1 is good (the HST CALSPEC convention for DATAQUAL; the column has no comment saying otherwise)'
  } else if (logical) {
    goodIsOne = false
    rule = 'true is bad (masked-array convention)'
  } else {
    goodIsOne = false
    rule = '0 is good, non-zero is bad (common practice for quality flags)'
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    if (Number.isNaN(v)) continue
    flags[i] = goodIsOne ? (v === 0 ? 1 : 0) : v !== 0 ? 1 : 0
  }
  return { source: label, rule, flags }
}

/** Of a survey's AND_MASK and OR_MASK, the AND mask is the one recommended for science; the OR mask is kept as a note. */
export function preferAndMask<T extends { name: string }>(masks: T[]): { use: T[]; dropped: T[] } {
  const isOr = (m: T) => /^OR_?MASK$/i.test(m.name.trim())
  const hasAnd = masks.some((m) => /^AND_?MASK$/i.test(m.name.trim()))
  return hasAnd ? { use: masks.filter((m) => !isOr(m)), dropped: masks.filter(isOr) } : { use: masks, dropped: [] }
}
