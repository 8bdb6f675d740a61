import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import ReviewKeyMap from '@/components/ReviewKeyMap.vue'
import { KEY_GROUPS, KEY_MAP, REVIEW_KEYS, actionFor } from '@/lib/reviewKeys'

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
  it('walks the neighbour matrix with the arrows and picks with Enter', () => {
    expect(press('ArrowLeft')).toBe('matrixLeft')
    expect(press('ArrowRight')).toBe('matrixRight')
    expect(press('ArrowUp')).toBe('matrixUp')
    expect(press('ArrowDown')).toBe('matrixDown')
    expect(press('Enter')).toBe('matrixPick')
    expect(press('Home')).toBe('matrixHome')
  })

  it('maps the letters of the region strip, the tiles and the call', () => {
    expect(press('r')).toBe('regionNext')
    expect(press('R')).toBe('regionPrevious')
    expect(press('w')).toBe('regionWhole')
    expect(press('m')).toBe('markers')
    expect(press('d')).toBe('tileMode')
    expect(press('g')).toBe('findStandard')
    expect(press('y')).toBe('takeSuggestion')
    expect(press('/')).toBe('writeCall')
    expect(press('u')).toBe('toggleUncertain')
    expect(press('2')).toBe('confidence2')
    expect(press(' ')).toBe('next')
    expect(press('x')).toBeNull()
  })

  it('leaves typed letters, arrows and Space to the field while typing', () => {
    const input = field(true)
    expect(press('y', input)).toBeNull()
    expect(press('ArrowLeft', input)).toBeNull()
    expect(press(' ', input)).toBeNull()
    expect(press('1', input)).toBeNull()
  })

  it('records with Enter from the call form and Ctrl+Enter anywhere; other fields keep their Enter', () => {
    expect(press('Enter', field(true))).toBe('submit')
    expect(press('Enter', field(false))).toBeNull()
    expect(press('Enter', document.body, { ctrlKey: true })).toBe('submit')
    expect(press('Enter', field(false), { ctrlKey: true })).toBe('submit')
  })

  it('leaves Enter and Space to a focused button', () => {
    const button = document.createElement('button')
    document.body.appendChild(button)
    expect(press('Enter', button)).toBeNull()
    expect(press(' ', button)).toBeNull()
  })

  it('leaves a field with Esc and sets the confidence with Alt+digit while typing', () => {
    const input = field(true)
    expect(press('Escape', input)).toBe('leaveField')
    expect(press('2', input, { altKey: true })).toBe('confidence2')
    expect(press('3', document.body, { altKey: true })).toBe('confidence3')
  })

  it('ignores the keys when Ctrl is held, so the browser’s own shortcuts work', () => {
    expect(press('y', document.body, { ctrlKey: true })).toBeNull()
    expect(press('r', document.body, { metaKey: true })).toBeNull()
    expect(press('ArrowLeft', document.body, { ctrlKey: true })).toBeNull()
  })

  it('binds no key twice outside fields', () => {
    const seen = new Map<string, string>()
    for (const b of REVIEW_KEYS) {
      if (b.action === 'submit') continue
      for (const k of b.keys) {
        expect(seen.get(k), `${k} is bound to ${seen.get(k)} and ${b.action}`).toBeUndefined()
        seen.set(k, b.action)
      }
    }
  })
})

describe('ReviewKeyMap', () => {
  it('draws every labelled binding of the key table, in its group', () => {
    const wrapper = mount(ReviewKeyMap)
    const map = wrapper.get('[data-testid="key-map"]')
    for (const g of KEY_GROUPS) {
      const group = map.get(`[data-group="${g.id}"]`)
      expect(group.text()).toContain(g.title)
      for (const b of KEY_MAP.filter((x) => x.group === g.id)) {
        expect(group.text()).toContain(b.label)
        expect(group.text()).toContain(b.what)
      }
    }
    expect(wrapper.findAll('[data-testid="key-map-key"]')).toHaveLength(KEY_MAP.length)
  })

  it('documents every action: each is drawn itself or shares the row before it', () => {
    const labelled = new Set(KEY_MAP.map((b) => b.group + b.what))
    expect(labelled.size).toBe(KEY_MAP.length)
    const text = mount(ReviewKeyMap).text()
    for (const words of [
      'earlier / later type in the matrix',
      'show the highlighted standard in the large plot',
      'next / previous region of the strip',
      'take the suggestion as your call',
      'next spectrum',
    ]) {
      expect(text).toContain(words)
    }
  })
})
