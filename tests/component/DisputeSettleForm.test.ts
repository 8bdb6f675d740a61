import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import DisputeSettleForm from '@/components/DisputeSettleForm.vue'
import { flush } from './helpers'

describe('DisputeSettleForm', () => {
  it('asks for a reason and a readable type before settling', async () => {
    const wrapper = mount(DisputeSettleForm)
    await wrapper.get('[data-testid="settle-type"]').setValue('B8')
    await wrapper.get('form').trigger('submit')
    expect(wrapper.text()).toContain('Choose a luminosity class')
    expect(wrapper.text()).toContain('Say why you settled it this way.')
    expect(wrapper.emitted('settle')).toBeUndefined()
  })

  it('starts from one of the calls and emits the settlement', async () => {
    const wrapper = mount(DisputeSettleForm, {
      props: {
        presets: [
          { label: 'B8 III', type: 'B8', luminosityClass: 'III' },
          { label: 'A1 III', type: 'A1', luminosityClass: 'III' },
        ],
      },
    })
    await wrapper.findAll('[data-testid="settle-preset"]')[1]!.trigger('click')
    await wrapper.get('[data-testid="settle-note"]').setValue('Ca II K too weak for B8')
    await flush()
    expect(wrapper.text()).toContain('Settles as A1 III')
    await wrapper.get('form').trigger('submit')
    expect(wrapper.emitted('settle')?.[0]).toEqual([{ spectralType: 'A1', luminosityClass: 'III', peculiarities: '', note: 'Ca II K too weak for B8' }, 'A1 III'])
  })
})
