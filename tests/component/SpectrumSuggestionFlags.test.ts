import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import SpectrumSuggestionFlags from '@/components/SpectrumSuggestionFlags.vue'
import { SUGGESTION_FLAGS } from '@shared/api/suggestions'

describe('SpectrumSuggestionFlags', () => {
  it('names and explains every flag the pipeline can raise, none with the generic fallback', () => {
    const wrapper = mount(SpectrumSuggestionFlags, { props: { flags: [...SUGGESTION_FLAGS] } })
    const items = wrapper.findAll('[data-testid="suggestion-flag"]')
    expect(items.map((i) => i.attributes('data-flag'))).toEqual([...SUGGESTION_FLAGS])
    for (const item of items) {
      expect(item.text()).not.toContain('A quality flag raised by the pipeline')
    }
    expect(wrapper.text()).toContain('Not a star')
    expect(wrapper.text()).toContain('galaxy or a quasar')
  })

  it('says so when there is no flag', () => {
    expect(
      mount(SpectrumSuggestionFlags, { props: { flags: [] } })
        .get('[data-testid="suggestion-no-flags"]')
        .text(),
    ).toContain('No quality flags')
  })
})
