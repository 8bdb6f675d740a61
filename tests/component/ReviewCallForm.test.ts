import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import ReviewCallForm from '@/components/ReviewCallForm.vue'
import type { ValidCall } from '@/lib/reviewCall'
import { checkCall, emptyDraft, toCallInput } from '@/lib/reviewCall'

const suggestion = { spectralType: 'B8 III', letter: 'B', subtype: 8, luminosityClass: 'III' }

async function fill(wrapper: ReturnType<typeof mount>, fields: Record<string, string>) {
  for (const [id, value] of Object.entries(fields)) await wrapper.get(`[data-testid="${id}"]`).setValue(value)
}

describe('checkCall', () => {
  it('accepts a letter with a subtype and a class, and writes the call back in MK notation', () => {
    const r = checkCall({ ...emptyDraft(), type: 'k1.5', luminosityClass: 'IIIb', peculiarities: 'CN0.5' })
    expect(r.ok).toBe(false) // lower-case letters are not MK letters
    const ok = checkCall({ ...emptyDraft(), type: 'K1.5', luminosityClass: 'IIIb', peculiarities: 'CN0.5' })
    expect(ok.ok && ok.call).toMatchObject({
      display: 'K1.5 IIIb CN0.5',
      spectralType: 'K1.5',
      letter: 'K',
      subtype: 1.5,
      typeCode: 51.5,
      luminosityClass: 'IIIb',
      classCode: 4.25,
      peculiarityList: ['CN0.5'],
    })
  })

  it('takes the class from the type field when the class field is empty', () => {
    const r = checkCall({ ...emptyDraft(), type: 'B8 III' })
    expect(r.ok && [r.call.spectralType, r.call.luminosityClass]).toEqual(['B8', 'III'])
  })

  it('names each missing or unreadable part', () => {
    const r = checkCall({ ...emptyDraft(), type: '', luminosityClass: '', confidence: null })
    expect(r.ok).toBe(false)
    if (!r.ok) expect(Object.keys(r.errors).sort()).toEqual(['confidence', 'luminosityClass', 'type'])
    const noSubtype = checkCall({ ...emptyDraft(), type: 'B', luminosityClass: 'V' })
    expect(!noSubtype.ok && noSubtype.errors.type).toBe('Add a subtype, e.g. B5.')
    const inType = checkCall({ ...emptyDraft(), type: 'A0 III', luminosityClass: 'V' })
    expect(!inType.ok && inType.errors.type).toBe('The type names a different class from the class field.')
    const offGrid = checkCall({ ...emptyDraft(), type: 'DA3', luminosityClass: 'V' })
    expect(!offGrid.ok && offGrid.errors.type).toMatch(/MK letter/)
    const badClass = checkCall({ ...emptyDraft(), type: 'A0', luminosityClass: 'XI' })
    expect(!badClass.ok && badClass.errors.luminosityClass).toMatch(/Not a luminosity class/)
    const badNotes = checkCall({ ...emptyDraft(), type: 'A0', luminosityClass: 'V', peculiarities: 'xyz' })
    expect(!badNotes.ok && badNotes.errors.peculiarities).toBe('Cannot read the notes: cannot read "xyz".')
  })

  it('takes a range of adjacent types as the API does, at its middle (B8-9 is 18.5)', () => {
    // The form and the API read calls with the same rules (shared/mkCall.ts); the code of a range is its middle (MK practice, from memory).
    const r = checkCall({ ...emptyDraft(), type: 'B8-9', luminosityClass: 'V' })
    expect(r.ok && [r.call.spectralType, r.call.typeCode, r.call.display]).toEqual(['B8-9', 18.5, 'B8-9 V'])
  })

  it('marks an uncertain type with a colon and sends the parts the API reads', () => {
    const r = checkCall({ ...emptyDraft(), type: 'A1', luminosityClass: 'V', peculiarities: 'n', uncertain: true, confidence: 1, note: ' broad lines ' })
    expect(r.ok && r.call.display).toBe('A1: V n')
    if (r.ok)
      expect(toCallInput(r.call, false)).toEqual({ spectralType: 'A1', luminosityClass: 'V', peculiarities: 'n', notes: 'broad lines', confidence: 1, uncertain: true, acceptedSuggestion: false })
  })
})

describe('ReviewCallForm', () => {
  it('shows the checks only after a first attempt, and emits nothing while the call is incomplete', async () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion: null } })
    expect(wrapper.find('[data-testid="call-type-error"]').exists()).toBe(false)
    await wrapper.get('[data-testid="call-submit"]').trigger('click')
    expect(wrapper.get('[data-testid="call-type-error"]').text()).toBe('Write a spectral type, e.g. B8 or K1.5.')
    expect(wrapper.get('[data-testid="call-class-error"]').text()).toContain('Choose a luminosity class')
    expect(wrapper.emitted('submit')).toBeUndefined()
  })

  it('emits a valid call with the preview of what it records', async () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion: null } })
    await fill(wrapper, { 'call-type': 'A2', 'call-class': 'IV', 'call-peculiarities': 'Si', 'call-note': 'strong Si II 4128' })
    expect(wrapper.get('[data-testid="call-preview"]').text()).toContain('A2 IV Si')
    await wrapper.get('[data-testid="call-submit"]').trigger('click')
    const [call] = wrapper.emitted('submit')![0] as [ValidCall]
    expect(call).toMatchObject({ spectralType: 'A2', luminosityClass: 'IV', peculiarities: 'Si', note: 'strong Si II 4128', confidence: 2 })
  })

  it('picks a class with the quick buttons', async () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion: null } })
    await fill(wrapper, { 'call-type': 'G8' })
    await wrapper.get('[data-testid="call-class-III"]').trigger('click')
    expect((wrapper.get('[data-testid="call-class"]').element as HTMLInputElement).value).toBe('III')
  })

  it('accepts the suggestion in one action, keeping the confidence and note', async () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion } })
    await fill(wrapper, { 'call-note': 'looks right' })
    await wrapper.get('[data-testid="call-confidence-3"] input').setValue(true)
    expect(wrapper.get('[data-testid="call-accept"]').text()).toContain('Take B8 III')
    await wrapper.get('[data-testid="call-accept"]').trigger('click')
    expect(wrapper.emitted('accept')?.[0]).toEqual([{ confidence: 3, note: 'looks right' }])
  })

  it('offers no accept button while blind review withholds the suggestion', () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion: null } })
    expect(wrapper.find('[data-testid="call-accept"]').exists()).toBe(false)
    expect((wrapper.vm as unknown as { accept: () => boolean }).accept()).toBe(false)
  })

  it('shows the server’s field messages beside the fields', () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion: null, serverErrors: { luminosityClass: 'is not a luminosity class' } } })
    expect(wrapper.get('[data-testid="call-class-error"]').text()).toBe('is not a luminosity class')
  })

  it('clears the form for the next spectrum', async () => {
    const wrapper = mount(ReviewCallForm, { props: { suggestion: null, resetKey: 1 } })
    await fill(wrapper, { 'call-type': 'F5' })
    await wrapper.setProps({ resetKey: 2 })
    expect((wrapper.get('[data-testid="call-type"]').element as HTMLInputElement).value).toBe('')
  })
})
