import { mount } from '@vue/test-utils'
import { NConfigProvider } from 'naive-ui'
import { describe, expect, it, vi } from 'vitest'
import { defineComponent, h, nextTick, ref } from 'vue'
import type { CampaignDetail } from '@/api/campaignsAdmin'
import { ApiError } from '@/api/http'
import CampaignFormDialog from '@/components/CampaignFormDialog.vue'
import { flush } from './helpers'

const saved: CampaignDetail = {
  id: 9,
  code: 'SKY-27',
  name: 'Southern Arc Survey',
  description: '',
  observatory: 'Kestrel Ridge Observatory',
  regionMin: 3850,
  regionMax: 5000,
  callsRequired: 2,
  blindReview: true,
  typeTolerance: 1,
  classTolerance: 1,
  deadline: null,
  members: [],
  createdAt: '2026-03-01T10:00:00.000Z',
  updatedAt: '2026-03-01T10:00:00.000Z',
}

// The dialog teleports into the body; a provider around it, and the body is where to look.
function open(save: (...args: unknown[]) => Promise<CampaignDetail>) {
  const shown = ref(false)
  const Host = defineComponent({
    setup: () => () => h(NConfigProvider, null, () => h(CampaignFormDialog, { show: shown.value, campaign: null, save, 'onUpdate:show': (v: boolean) => (shown.value = v) })),
  })
  const wrapper = mount(Host, { attachTo: document.body })
  return Object.assign(wrapper, { show: async () => ((shown.value = true), await nextTick()) })
}
const q = (id: string) => document.body.querySelector(`[data-testid="${id}"]`) as HTMLInputElement | null
async function type(id: string, value: string) {
  const el = q(id)!
  el.value = value
  el.dispatchEvent(new Event('input'))
  await nextTick()
}

describe('CampaignFormDialog', () => {
  it('checks the code and name before asking the server, then sends the rules', async () => {
    const save = vi.fn(async () => saved)
    const wrapper = open(save)
    await wrapper.show()
    await flush()
    q('campaign-save')!.closest('form')!.dispatchEvent(new Event('submit'))
    await flush()
    expect(document.body.textContent).toContain('Give the campaign a name.')
    expect(document.body.textContent).toContain('Letters, digits, - and _, at most 32.')
    expect(save).not.toHaveBeenCalled()

    await type('campaign-name', 'Southern Arc Survey')
    await type('campaign-code', 'SKY-27')
    q('campaign-save')!.closest('form')!.dispatchEvent(new Event('submit'))
    await flush()
    expect(save).toHaveBeenCalledTimes(1)
    expect(save.mock.calls[0]).toEqual([
      {
        name: 'Southern Arc Survey',
        code: 'SKY-27',
        description: '',
        observatory: '',
        regionMin: 3850,
        regionMax: 5000,
        callsRequired: 1,
        blindReview: false,
        typeTolerance: 1,
        classTolerance: 1,
        deadline: null,
      },
      null,
    ])
    expect(wrapper.findComponent(CampaignFormDialog).emitted('saved')?.[0]).toEqual([saved, true])
    wrapper.unmount()
  })

  it('shows the server’s field messages', async () => {
    const save = vi.fn(async () => {
      throw new ApiError(409, 'conflict', 'A campaign with the code SKY-27 already exists.', { fields: { code: 'is already taken' } })
    })
    const wrapper = open(save)
    await wrapper.show()
    await flush()
    await type('campaign-name', 'Southern Arc Survey')
    await type('campaign-code', 'SKY-27')
    q('campaign-save')!.closest('form')!.dispatchEvent(new Event('submit'))
    await flush()
    expect(document.body.textContent).toContain('Is already taken.')
    expect(wrapper.findComponent(CampaignFormDialog).emitted('saved')).toBeUndefined()
    wrapper.unmount()
  })
})
