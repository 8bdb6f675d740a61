/**
 * The review workspace's keys: one table, read by the key handler and drawn on screen as the key map.
 * Arrows walk the neighbour matrix, Enter shows the highlighted standard; letters change the region,
 * the tiles and the call.
 */

export type ReviewAction =
  | 'matrixLeft'
  | 'matrixRight'
  | 'matrixUp'
  | 'matrixDown'
  | 'matrixPick'
  | 'matrixHome'
  | 'tileMode'
  | 'findStandard'
  | 'regionNext'
  | 'regionPrevious'
  | 'regionWhole'
  | 'markers'
  | 'takeSuggestion'
  | 'writeCall'
  | 'confidence1'
  | 'confidence2'
  | 'confidence3'
  | 'toggleUncertain'
  | 'submit'
  | 'leaveField'
  | 'next'

export type KeyGroup = 'compare' | 'region' | 'call'

export interface KeyBinding {
  action: ReviewAction
  /** KeyboardEvent.key values (case-sensitive). */
  keys: readonly string[]
  /** Shown in the key map; '' for a binding drawn together with the one before it. */
  label: string
  what: string
  /** Also works while typing in a form field. */
  inFields?: boolean
  /** Needs Ctrl (or ⌘). */
  ctrl?: boolean
  /** Needs Alt while typing in a field (outside fields the plain key works too). */
  altInFields?: boolean
  group: KeyGroup
}

export const REVIEW_KEYS: readonly KeyBinding[] = [
  { action: 'matrixLeft', keys: ['ArrowLeft'], label: '← →', what: 'earlier / later type in the matrix', group: 'compare' },
  { action: 'matrixRight', keys: ['ArrowRight'], label: '', what: '', group: 'compare' },
  { action: 'matrixUp', keys: ['ArrowUp'], label: '↑ ↓', what: 'brighter / fainter class in the matrix', group: 'compare' },
  { action: 'matrixDown', keys: ['ArrowDown'], label: '', what: '', group: 'compare' },
  { action: 'matrixPick', keys: ['Enter'], label: 'Enter', what: 'show the highlighted standard in the large plot', group: 'compare' },
  { action: 'matrixHome', keys: ['Home'], label: 'Home', what: 'back to the best standard', group: 'compare' },
  { action: 'tileMode', keys: ['d'], label: 'd', what: 'tiles: difference ↔ ratio', group: 'compare' },
  { action: 'findStandard', keys: ['g'], label: 'g', what: 'go to any standard by name', group: 'compare' },
  { action: 'regionNext', keys: ['r'], label: 'r R', what: 'next / previous region of the strip', group: 'region' },
  { action: 'regionPrevious', keys: ['R'], label: '', what: '', group: 'region' },
  { action: 'regionWhole', keys: ['w'], label: 'w', what: 'whole classification region', group: 'region' },
  { action: 'markers', keys: ['m'], label: 'm', what: 'line labels: this type ↔ all ↔ none', group: 'region' },
  { action: 'takeSuggestion', keys: ['y'], label: 'y', what: 'take the suggestion as your call', group: 'call' },
  { action: 'writeCall', keys: ['/'], label: '/', what: 'write your own call (Tab to the class)', group: 'call' },
  { action: 'confidence1', keys: ['1'], label: '1 2 3', what: 'confidence (Alt in a field)', inFields: true, altInFields: true, group: 'call' },
  { action: 'confidence2', keys: ['2'], label: '', what: '', inFields: true, altInFields: true, group: 'call' },
  { action: 'confidence3', keys: ['3'], label: '', what: '', inFields: true, altInFields: true, group: 'call' },
  { action: 'toggleUncertain', keys: ['u'], label: 'u', what: 'mark the call uncertain', group: 'call' },
  { action: 'submit', keys: ['Enter'], label: 'Ctrl Enter', what: 'record the call (Enter in a field)', inFields: true, ctrl: true, group: 'call' },
  { action: 'leaveField', keys: ['Escape'], label: 'Esc', what: 'leave the field', inFields: true, group: 'call' },
  { action: 'next', keys: [' '], label: 'Space', what: 'next spectrum (same campaign and filters)', group: 'call' },
]

/** Whether the event comes from a place where typed characters are text. */
export function isTextTarget(target: EventTarget | null): boolean {
  if (!target || typeof (target as Element).closest !== 'function') return false
  const el = target as HTMLElement
  if (el.isContentEditable) return true
  return el.closest('input, textarea, select, [contenteditable="true"]') !== null
}

/** Whether the event comes from a control that has its own Enter and Space (a button, a link, a menu). */
function isControlTarget(target: EventTarget | null): boolean {
  if (!target || typeof (target as Element).closest !== 'function') return false
  return (target as Element).closest('button, a[href], [role="button"], [role="option"], [role="tab"]') !== null
}

/** The action a key press asks for, or null. Plain letters are ignored while typing in a field. */
export function actionFor(event: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'altKey' | 'target'>): ReviewAction | null {
  const inField = isTextTarget(event.target)
  const ctrl = event.ctrlKey || event.metaKey
  if (event.key === 'Enter') {
    // Ctrl Enter records from anywhere; plain Enter records from the call form's own fields,
    // picks the matrix cell elsewhere, and is left to buttons and menus that have the focus.
    if (ctrl) return 'submit'
    if (event.altKey) return null
    if (inField) return (event.target as HTMLElement).closest('[data-review-form]') !== null ? 'submit' : null
    return isControlTarget(event.target) ? null : 'matrixPick'
  }
  if (event.key === ' ' && (inField || isControlTarget(event.target))) return null
  for (const b of REVIEW_KEYS) {
    if (!b.keys.includes(event.key) || b.action === 'submit' || b.action === 'matrixPick') continue
    if (ctrl) continue
    if (inField) {
      if (!b.inFields) continue
      if (b.altInFields && !event.altKey) continue
    } else if (event.altKey && !b.altInFields) continue
    return b.action
  }
  return null
}

/** Key-map rows: the bindings that carry a label. */
export const KEY_MAP = REVIEW_KEYS.filter((b) => b.label !== '')

export const KEY_GROUPS: readonly { id: KeyGroup; title: string }[] = [
  { id: 'compare', title: 'Compare' },
  { id: 'region', title: 'Region' },
  { id: 'call', title: 'Call' },
]
