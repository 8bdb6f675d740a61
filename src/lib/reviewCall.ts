import { formatTypeExpr, parseMK } from '@shared/mk'
import { checkCallText } from '@shared/mkCall'

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
  /** The type as the API takes it, e.g. "B8" (or a range of adjacent types, "B8-9"). */
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

/** A field message of the shared rules as a sentence for the form. */
const sentence = (message: string) => `${message[0]!.toUpperCase()}${message.slice(1)}.`

/**
 * Checks a draft with the rules the API applies (shared/mkCall.ts), plus what only the form asks: a
 * confidence, and a class written after the type ("B8 III") filling an empty class field.
 */
export function checkCall(draft: CallDraft): CallCheck {
  const errors: Partial<Record<CallField, string>> = {}
  let typeText = draft.type.trim()
  let classText = draft.luminosityClass.trim()
  const split = parseMK(typeText)
  if (split.ok && split.value.kind === 'mk' && split.value.luminosityClass !== undefined && split.value.peculiarities.length === 0 && !split.value.composite) {
    const typeOnly = formatTypeExpr(split.value.type)
    if (classText === '' || classText === split.value.luminosityClass) {
      classText = split.value.luminosityClass
      typeText = typeOnly
    } else errors.type = 'The type names a different class from the class field.'
  }
  const confidence = draft.confidence
  if (confidence === null || ![1, 2, 3].includes(confidence)) errors.confidence = 'Choose a confidence of 1, 2 or 3.'
  const checked = checkCallText(typeText, classText, draft.peculiarities, draft.uncertain)
  if (!checked.ok) {
    if (checked.errors.spectralType) errors.type ??= sentence(checked.errors.spectralType)
    if (checked.errors.luminosityClass) errors.luminosityClass = sentence(checked.errors.luminosityClass)
    if (checked.errors.peculiarities) errors.peculiarities = sentence(checked.errors.peculiarities)
  }
  if (!checked.ok || Object.keys(errors).length > 0) return { ok: false, errors }
  const c = checked.call
  const typePart = typeText.replace(/:$/, '')
  return {
    ok: true,
    call: {
      display: c.spectralType,
      spectralType: typePart,
      letter: c.letter,
      subtype: c.subtype,
      typeCode: c.typeCode,
      luminosityClass: classText,
      classCode: c.classCode,
      peculiarities: draft.peculiarities.trim(),
      peculiarityList: c.peculiarities,
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
