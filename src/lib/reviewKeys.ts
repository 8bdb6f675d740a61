/** The Spectrum review screen's keys: one table, read by the handler and drawn as the on-screen legend. */

export type ReviewAction =
  | 'accept'
  | 'next'
  | 'focusType'
  | 'focusClass'
  | 'focusNote'
  | 'submit'
  | 'leaveField'
  | 'overlayPrevious'
  | 'overlayNext'
  | 'overlayEarlier'
  | 'overlayLater'
  | 'overlayBrighter'
  | 'overlayFainter'
  | 'chooseStandard'
  | 'zoom1'
  | 'zoom2'
  | 'zoom3'
  | 'zoom4'
  | 'zoom5'
  | 'zoomAll'
  | 'toggleBalmer'
  | 'toggleHelium'
  | 'toggleMetal'
  | 'toggleBand'
  | 'confidence1'
  | 'confidence2'
  | 'confidence3'
  | 'toggleUncertain'

export interface KeyBinding {
  action: ReviewAction
  /** KeyboardEvent.key values (case-sensitive). */
  keys: readonly string[]
  /** Shown in the legend. */
  label: string
  what: string
  /** Also works while typing in a form field. */
  inFields?: boolean
  ctrl?: boolean
  alt?: boolean
  group: 'call' | 'overlay' | 'view'
}

export const REVIEW_KEYS: readonly KeyBinding[] = [
  { action: 'accept', keys: ['a'], label: 'a', what: 'accept the suggestion', group: 'call' },
  { action: 'focusType', keys: ['t'], label: 't', what: 'spectral type field', group: 'call' },
  { action: 'focusClass', keys: ['c'], label: 'c', what: 'luminosity class field', group: 'call' },
  { action: 'focusNote', keys: ['p'], label: 'p', what: 'peculiarity notes', group: 'call' },
  { action: 'confidence1', keys: ['1'], label: 'Alt 1–3', what: 'confidence', inFields: true, alt: true, group: 'call' },
  { action: 'confidence2', keys: ['2'], label: '', what: '', inFields: true, alt: true, group: 'call' },
  { action: 'confidence3', keys: ['3'], label: '', what: '', inFields: true, alt: true, group: 'call' },
  { action: 'toggleUncertain', keys: [':'], label: ':', what: 'mark the call uncertain', group: 'call' },
  { action: 'submit', keys: ['Enter'], label: 'Ctrl Enter', what: 'record the call (Enter in a field)', inFields: true, ctrl: true, group: 'call' },
  { action: 'leaveField', keys: ['Escape'], label: 'Esc', what: 'leave the field', inFields: true, group: 'call' },
  { action: 'next', keys: ['n'], label: 'n', what: 'next spectrum in the queue', group: 'call' },
  { action: 'overlayPrevious', keys: ['['], label: '[ ]', what: 'previous / next overlay', group: 'overlay' },
  { action: 'overlayNext', keys: [']'], label: '', what: '', group: 'overlay' },
  { action: 'overlayEarlier', keys: [','], label: ', .', what: 'one subtype earlier / later', group: 'overlay' },
  { action: 'overlayLater', keys: ['.'], label: '', what: '', group: 'overlay' },
  { action: 'overlayBrighter', keys: ['-'], label: '- =', what: 'one class brighter / fainter', group: 'overlay' },
  { action: 'overlayFainter', keys: ['=', '+'], label: '', what: '', group: 'overlay' },
  { action: 'chooseStandard', keys: ['s'], label: 's', what: 'choose a standard by type', group: 'overlay' },
  { action: 'zoom1', keys: ['1'], label: '1–5', what: 'zoom to a classic region', group: 'view' },
  { action: 'zoom2', keys: ['2'], label: '', what: '', group: 'view' },
  { action: 'zoom3', keys: ['3'], label: '', what: '', group: 'view' },
  { action: 'zoom4', keys: ['4'], label: '', what: '', group: 'view' },
  { action: 'zoom5', keys: ['5'], label: '', what: '', group: 'view' },
  { action: 'zoomAll', keys: ['0'], label: '0', what: 'whole classification region', group: 'view' },
  { action: 'toggleBalmer', keys: ['B'], label: '⇧B H M G', what: 'line markers: Balmer, helium, metals, bands', group: 'view' },
  { action: 'toggleHelium', keys: ['H'], label: '', what: '', group: 'view' },
  { action: 'toggleMetal', keys: ['M'], label: '', what: '', group: 'view' },
  { action: 'toggleBand', keys: ['G'], label: '', what: '', group: 'view' },
]

/** Whether the event comes from a place where typed characters are text. */
export function isTextTarget(target: EventTarget | null): boolean {
  if (!target || typeof (target as Element).closest !== 'function') return false
  const el = target as HTMLElement
  if (el.isContentEditable) return true
  return el.closest('input, textarea, select, [contenteditable="true"]') !== null
}

/** The action a key press asks for, or null. Plain letters are ignored while typing in a field. */
export function actionFor(event: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'altKey' | 'target'>): ReviewAction | null {
  const inField = isTextTarget(event.target)
  const ctrl = event.ctrlKey || event.metaKey
  for (const b of REVIEW_KEYS) {
    if (!b.keys.includes(event.key)) continue
    if (b.action === 'submit') {
      // Plain Enter records the call only from the call form's own fields (a menu's Enter picks its item).
      if (ctrl || (inField && (event.target as HTMLElement).closest('[data-review-form]') !== null)) return 'submit'
      continue
    }
    if (Boolean(b.alt) !== event.altKey) continue
    if (ctrl) continue
    if (inField && !b.inFields) continue
    return b.action
  }
  return null
}

/** Legend rows: the bindings that carry a label. */
export const LEGEND = REVIEW_KEYS.filter((b) => b.label !== '')
