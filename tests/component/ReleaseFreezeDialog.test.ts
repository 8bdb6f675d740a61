import { DOMWrapper, flushPromises, mount } from '@vue/test-utils'
import { NConfigProvider } from 'naive-ui'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import { ApiError } from '@/api/http'
import type { FreezeInput, ReleaseSummary } from '@/api/releases'
import ReleaseFreezeDialog from '@/components/ReleaseFreezeDialog.vue'

const campaigns = [{ id: 3, code: 'KRO-NFS26', name: 'Northern Fields Survey 2026' }]
const frozen: ReleaseSummary = {
  id: 9,
  version: 1,
  campaign: campaigns[0]!,
  title: 'Northern fields, first release',
  description: '',
  createdAt: '2026-04-01T10:00:00.000Z',
  createdBy: { id: 1, name: 'Maren Olukoya' },
  rows: 31,
  supersededBy: null,
  authors: '',
  downloads: {
    csv: '/api/releases/9/download?format=csv',
    ecsv: '/api/releases/9/download?format=ecsv',
    votable: '/api/releases/9/download?format=votable',
    fits: '/api/releases/9/download?format=fits',
    mrt: '/api/releases/9/download?format=mrt',
  },
}

function mountDialog(freeze: (input: FreezeInput) => Promise<ReleaseSummary>) {
  const show = ref(true)
  const onFrozen = vi.fn()
  const Host = defineComponent(() => () => h(NConfigProvider, null, () => h(ReleaseFreezeDialog, { show: show.value, 'onUpdate:show': (v: boolean) => (show.value = v), campaigns, freeze, onFrozen })))
  const wrapper = mount(Host, { attachTo: document.body })
  return { wrapper, show, onFrozen }
}

// The dialog is teleported to the body; the newest match is the open dialog's.
const byTestid = (id: string) => [...document.body.querySelectorAll<HTMLElement>(`[data-testid="${id}"]`)].pop() ?? null

async function typeInto(id: string, text: string) {
  await new DOMWrapper(byTestid(id)!).setValue(text)
  await flushPromises()
}

afterEach(() => {
  document.body.innerHTML = ''
})

describe('ReleaseFreezeDialog', () => {
  it('asks for a title, then explains the snapshot and needs the lead to confirm before freezing', async () => {
    const freeze = vi.fn(async () => frozen)
    const { wrapper, show, onFrozen } = mountDialog(freeze)
    await flushPromises()
    expect((byTestid('freeze-next') as HTMLButtonElement).disabled).toBe(true)

    await typeInto('freeze-title', '  Northern fields, first release ')
    await typeInto('freeze-description', 'Every agreed spectrum of the spring run.')
    expect((byTestid('freeze-next') as HTMLButtonElement).disabled).toBe(false)
    byTestid('freeze-next')!.click()
    await flushPromises()

    const confirm = byTestid('freeze-confirm')!
    expect(confirm.textContent).toContain('immutable snapshot of every agreed or settled spectrum')
    expect(confirm.textContent).toContain('KRO-NFS26')
    expect((byTestid('freeze-confirm-button') as HTMLButtonElement).disabled).toBe(true)
    expect(freeze).not.toHaveBeenCalled()

    byTestid('freeze-understood')!.click()
    await flushPromises()
    byTestid('freeze-confirm-button')!.click()
    await flushPromises()

    expect(freeze).toHaveBeenCalledWith({ campaignId: 3, title: 'Northern fields, first release', description: 'Every agreed spectrum of the spring run.', authors: '', includeDecider: true })
    expect(onFrozen).toHaveBeenCalledWith(frozen)
    expect(show.value).toBe(false)
    wrapper.unmount()
  })

  it('keeps the dialog open and shows the server’s message when freezing fails', async () => {
    const freeze = vi.fn(async () => {
      throw new ApiError(409, 'nothing_to_release', 'No spectrum of this campaign is agreed or settled yet.')
    })
    const { wrapper, show, onFrozen } = mountDialog(freeze)
    await flushPromises()
    await typeInto('freeze-title', 'Too early')
    byTestid('freeze-next')!.click()
    await flushPromises()
    byTestid('freeze-understood')!.click()
    await flushPromises()
    byTestid('freeze-confirm-button')!.click()
    await flushPromises()

    expect(byTestid('freeze-error')?.textContent).toContain('No spectrum of this campaign is agreed or settled yet.')
    expect(onFrozen).not.toHaveBeenCalled()
    expect(show.value).toBe(true)
    wrapper.unmount()
  })
})
