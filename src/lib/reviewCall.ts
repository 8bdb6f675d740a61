import { LUMINOSITY_CLASSES, MK_LETTERS, classCodeOf, formatMK, parseMK, typeCodeOf } from '@shared/mk'

/** What the classifier has typed into the call form. */
export interface CallDraft {
  /** Letter and subtype, e.g. "B8" or "K1.5"; "B8 III" also fills an empty class field. */
  type: string
  luminosityClass: string
  /** MK peculiarity notes as written after the class: "n", "e", "Si", "CN0.5" … */
  peculiarities: string
  uncertain: boolean
  confidence: number | null
  note: string
}

export const emptyDraft = (): CallDraft => ({ type: '', luminosityClass: '', peculiarities: '', uncertain: false, confidence: 2, note: '' })

/** A recorded call as the form needs it to start a correction from. */
export interface StandingCall {
  letter: string
  subtype: number
  luminosityClass: string
  peculiarities: string[]
  uncertain: boolean
  confidence: number
  notes: string
}

/** The draft a correction starts from: the standing call as it was recorded. */
export const draftFromCall = (call: StandingCall): CallDraft => ({
  type: `${call.letter}${call.subtype}`,
  luminosityClass: call.luminosityClass,
  peculiarities: call.peculiarities.join(' '),
  uncertain: call.uncertain,
  confidence: [1, 2, 3].includes(call.confidence) ? call.confidence : 2,
  note: call.notes,
})

export type CallField = 'type' | 'luminosityClass' | 'peculiarities' | 'confidence'

/** A call the server can take: canonical MK text plus its parts. */
export interface ValidCall {
  /** Canonical MK text of the whole call, e.g. "B8: III n", for the screen. */
  display: string
  /** Letter and subtype as the API takes them, e.g. "B8". */
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  /** The notes as written (the API reads them with the same parser). */
  peculiarities: string
  peculiarityList: string[]
  uncertain: boolean
  confidence: number
  note: string
}

export type CallCheck = { ok: true; call: ValidCall } | { ok: false; errors: Partial<Record<CallField, string>> }

const CALL_LETTERS = MK_LETTERS.filter((l) => l.code < 70).map((l) => l.letter)

/** Checks a draft with the shared MK parser: an O–M type with a subtype, a known class, readable notes. */
export function checkCall(draft: CallDraft): CallCheck {
  const errors: Partial<Record<CallField, string>> = {}
  const typeText = draft.type.trim()
  let classText = draft.luminosityClass.trim()
  let letter = ''
  let subtype = Number.NaN

  if (typeText === '') errors.type = 'Write a spectral type, e.g. B8 or K1.5.'
  else {
    const parsed = parseMK(typeText)
    if (!parsed.ok) errors.type = `Not a spectral type: ${parsed.reason}.`
    else if (parsed.value.kind !== 'mk' || !CALL_LETTERS.includes(parsed.value.letter)) errors.type = `Use an MK letter ${CALL_LETTERS.join(' ')} with a subtype.`
    else if (parsed.value.subtype === undefined) errors.type = `Add a subtype, e.g. ${parsed.value.letter}5.`
    else if (parsed.value.type.points.length > 1) errors.type = 'Give one type, not a range.'
    else if (parsed.value.subtype > 9.75) errors.type = 'The subtype runs from 0 to 9.5.'
    else if (parsed.value.peculiarities.length > 0) errors.type = 'Write peculiarity notes in their own field.'
    else {
      letter = parsed.value.letter
      subtype = parsed.value.subtype
      if (parsed.value.luminosityClass) {
        if (classText === '') classText = parsed.value.luminosityClass
        else if (classText !== parsed.value.luminosityClass) errors.type = 'The type names a different class from the class field.'
      }
    }
  }

  let classCode: number | undefined
  if (classText === '') errors.luminosityClass = 'Choose a luminosity class, e.g. V or III.'
  else {
    classCode = classCodeOf(classText)
    if (classCode === undefined) errors.luminosityClass = `Not a luminosity class; use ${LUMINOSITY_CLASSES.map((c) => c.text).join(', ')} (or IV-V, IIIb …).`
  }

  const confidence = draft.confidence
  if (confidence === null || ![1, 2, 3].includes(confidence)) errors.confidence = 'Choose a confidence of 1, 2 or 3.'

  let peculiarityList: string[] = []
  let display = ''
  if (!errors.type && !errors.luminosityClass) {
    const full = `${letter}${subtype}${draft.uncertain ? ':' : ''} ${classText} ${draft.peculiarities.trim()}`.trim()
    const parsed = parseMK(full)
    if (!parsed.ok) errors.peculiarities = `Cannot read the notes: ${parsed.reason.replace(/ at character \d+$/, '')}.`
    else if (parsed.value.composite) errors.peculiarities = 'A composite spectrum goes in the free note.'
    else {
      peculiarityList = parsed.value.peculiarities
      display = formatMK(parsed.value)
    }
  }

  if (Object.keys(errors).length > 0) return { ok: false, errors }
  return {
    ok: true,
    call: {
      display,
      spectralType: `${letter}${subtype}`,
      letter,
      subtype,
      typeCode: typeCodeOf(letter, subtype)!,
      luminosityClass: classText,
      classCode: classCode!,
      peculiarities: draft.peculiarities.trim(),
      peculiarityList,
      uncertain: draft.uncertain,
      confidence: confidence!,
      note: draft.note.trim(),
    },
  }
}

/** The request body for POST /api/spectra/:id/calls. */
export function toCallInput(call: ValidCall, acceptedSuggestion: boolean) {
  return {
    spectralType: call.spectralType,
    luminosityClass: call.luminosityClass,
    peculiarities: call.peculiarities,
    notes: call.note,
    confidence: call.confidence,
    uncertain: call.uncertain,
    acceptedSuggestion,
  }
}
