import { describe, expect, it } from 'vitest'
import { LEGEND, REVIEW_KEYS, actionFor } from '@/lib/reviewKeys'

function press(key: string, target: EventTarget | null = document.body, mods: Partial<Pick<KeyboardEvent, 'ctrlKey' | 'altKey' | 'metaKey'>> = {}) {
  return actionFor({ key, target, ctrlKey: false, altKey: false, metaKey: false, ...mods })
}

function field(inForm: boolean): HTMLInputElement {
  const host = document.createElement('div')
  if (inForm) host.setAttribute('data-review-form', '')
  const input = document.createElement('input')
  host.appendChild(input)
  document.body.appendChild(host)
  return input
}

describe('actionFor', () => {
  it('maps the single keys outside fields', () => {
    expect(press('a')).toBe('accept')
    expect(press('n')).toBe('next')
    expect(press('t')).toBe('focusType')
    expect(press('[')).toBe('overlayPrevious')
    expect(press(']')).toBe('overlayNext')
    expect(press(',')).toBe('overlayEarlier')
    expect(press('.')).toBe('overlayLater')
    expect(press('-')).toBe('overlayBrighter')
    expect(press('=')).toBe('overlayFainter')
    expect(press('s')).toBe('chooseStandard')
    expect(press('1')).toBe('zoom1')
    expect(press('5')).toBe('zoom5')
    expect(press('0')).toBe('zoomAll')
    expect(press('B')).toBe('toggleBalmer')
    expect(press('x')).toBeNull()
  })

  it('leaves typed letters to the field while typing', () => {
    const input = field(true)
    expect(press('a', input)).toBeNull()
    expect(press('n', input)).toBeNull()
    expect(press('1', input)).toBeNull()
  })

  it('records with Enter from the call form, and with Ctrl+Enter anywhere', () => {
    expect(press('Enter', field(true))).toBe('submit')
    expect(press('Enter', field(false))).toBeNull()
    expect(press('Enter')).toBeNull()
    expect(press('Enter', document.body, { ctrlKey: true })).toBe('submit')
    expect(press('Enter', field(false), { ctrlKey: true })).toBe('submit')
  })

  it('leaves a field with Esc and sets the confidence with Alt+digit even while typing', () => {
    const input = field(true)
    expect(press('Escape', input)).toBe('leaveField')
    expect(press('2', input, { altKey: true })).toBe('confidence2')
    expect(press('3', document.body, { altKey: true })).toBe('confidence3')
  })

  it('ignores the keys when Ctrl is held, so the browser’s own shortcuts work', () => {
    expect(press('a', document.body, { ctrlKey: true })).toBeNull()
    expect(press('n', document.body, { metaKey: true })).toBeNull()
  })

  it('documents every action in the legend table', () => {
    const labelled = new Set(LEGEND.map((b) => b.group + b.what))
    expect(LEGEND.length).toBeGreaterThan(10)
    expect(labelled.size).toBe(LEGEND.length)
    for (const b of REVIEW_KEYS) expect(b.keys.length).toBeGreaterThan(0)
  })
})
