import { LUMINOSITY_CLASSES, MK_LETTERS, classCodeOf, formatMK, parseMK, type MKValue } from './mk'

/** A classifier's call read with the MK parser: the grid position and the canonical text. */
export interface ParsedCall {
  /** Canonical MK text, e.g. "A1 V n". */
  spectralType: string
  letter: string
  subtype: number
  /** A range of adjacent types ("B8-9") counts as its middle (18.5). */
  typeCode: number
  luminosityClass: string
  classCode: number
  peculiarities: string[]
  uncertain: boolean
}

export type CallTextField = 'spectralType' | 'luminosityClass' | 'peculiarities'

export type CallTextCheck = { ok: true; call: ParsedCall } | { ok: false; errors: Partial<Record<CallTextField, string>> }

/** Letters a call may use: the library's types, O to M. */
export const CALL_LETTERS: readonly string[] = MK_LETTERS.filter((l) => l.code < 70).map((l) => l.letter)

export function parsedCallOf(v: MKValue): ParsedCall {
  return {
    spectralType: formatMK(v),
    letter: v.letter,
    subtype: v.subtype ?? 0,
    typeCode: v.typeCode!,
    luminosityClass: v.luminosityClass!,
    classCode: v.classCode!,
    peculiarities: v.peculiarities,
    uncertain: v.uncertain.type || v.uncertain.class,
  }
}

/**
 * The rules a call must meet, the same for the review form and the API: a type O–M with a subtype
 * (a range of adjacent types such as "B8-9" is taken as its middle), the luminosity class in its own
 * field, peculiarity notes in theirs, and no composite.
 */
export function checkCallText(spectralType: string, luminosityClass: string, peculiarities = '', uncertain = false): CallTextCheck {
  const errors: Partial<Record<CallTextField, string>> = {}
  const typeText = spectralType.trim()
  const classText = luminosityClass.trim()
  const notes = peculiarities.trim()
  if (typeText === '') errors.spectralType = 'write a spectral type, e.g. B8 or K1.5'
  else {
    const typeOnly = parseMK(typeText)
    if (!typeOnly.ok) errors.spectralType = `not a spectral type: ${typeOnly.reason}`
    else if (typeOnly.value.kind !== 'mk' || !CALL_LETTERS.includes(typeOnly.value.letter)) errors.spectralType = `use an MK letter ${CALL_LETTERS.join(' ')} with a subtype, e.g. B8 or K1.5`
    else if (typeOnly.value.typeCode === undefined) errors.spectralType = `add a subtype, e.g. ${typeOnly.value.letter}5`
    else if (typeOnly.value.luminosityClass !== undefined) errors.spectralType = 'give the luminosity class in its own field'
    else if (typeOnly.value.peculiarities.length > 0) errors.spectralType = 'write peculiarity notes in their own field'
  }
  if (classText === '') errors.luminosityClass = 'choose a luminosity class, e.g. V or III'
  else if (classCodeOf(classText) === undefined) errors.luminosityClass = `not a luminosity class; use ${LUMINOSITY_CLASSES.map((c) => c.text).join(', ')} (or IV-V, IIIb …)`
  if (errors.spectralType || errors.luminosityClass) return { ok: false, errors }

  const field: CallTextField = notes ? 'peculiarities' : 'luminosityClass'
  const full = parseMK(`${typeText}${uncertain && !typeText.endsWith(':') ? ':' : ''} ${classText} ${notes}`.trim())
  if (!full.ok) return { ok: false, errors: { [field]: `cannot read the ${notes ? 'notes' : 'class'}: ${full.reason.replace(/ at character \d+$/, '')}` } }
  const v = full.value
  if (v.composite) return { ok: false, errors: { [field]: 'a composite spectrum goes in the free note' } }
  if (v.typeCode === undefined || v.classCode === undefined || v.luminosityClass === undefined) return { ok: false, errors: { [field]: 'does not leave a type and a luminosity class' } }
  return { ok: true, call: parsedCallOf(v) }
}
