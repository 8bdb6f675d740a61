import { flushPromises, mount } from '@vue/test-utils'
import { NMessageProvider } from 'naive-ui'
import { createPinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter, RouterView } from 'vue-router'
import type { QueueItem, QueuePage } from '@/api/queue'

// The queue screen with its API replaced: a long queue arrives a page at a time.
const listQueue = vi.fn<(filters: unknown, after?: number) => Promise<QueuePage>>()
vi.mock('@/api/queue', () => ({
  QUEUE_PAGE_SIZE: 3,
  listQueue: (f: unknown, after?: number) => listQueue(f, after),
  claimQueueItem: async () => ({}),
}))
vi.mock('@/api/campaignsAdmin', () => ({ listCampaigns: async () => [] }))

const item = (spectrumId: number): QueueItem => ({
  spectrumId,
  objectName: `KRF ${spectrumId}`,
  campaign: { id: 1, code: 'NFS', name: 'Northern Fields Survey 2026', blindReview: false },
  snr: 60,
  flags: [],
  createdAt: '2026-03-01T10:00:00.000Z',
  status: 'suggested',
  claim: { state: 'free' },
  calls: { count: 0, needed: 2 },
  suggestion: null,
  hidden: false,
})

async function mountQueue() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/review', name: 'reviewQueue', component: () => import('@/views/ReviewQueueView.vue') },
      { path: '/review/:id', name: 'spectrumReview', component: { render: () => h('p', 'review') } },
    ],
  })
  await router.push('/review')
  const Host = defineComponent({ setup: () => () => h(NMessageProvider, null, () => h(RouterView)) })
  const wrapper = mount(Host, { global: { plugins: [router, createPinia()] }, attachTo: document.body })
  mounted.push(wrapper)
  await flushPromises()
  return wrapper
}

const mounted: { unmount(): void }[] = []
afterEach(() => {
  for (const w of mounted.splice(0)) w.unmount()
})
beforeEach(() => {
  listQueue.mockReset()
  sessionStorage.clear()
})

describe('Review queue paging', () => {
  it('says how many wait in all, and appends the page after the last row shown', async () => {
    listQueue.mockImplementation(async (_f, after) =>
      after === undefined
        ? { items: [item(1), item(2), item(3)], more: true, waiting: { count: 1000, atLeast: true }, claimMinutes: 10 }
        : { items: [item(4), item(5)], more: false, waiting: null, claimMinutes: 10 },
    )
    const wrapper = await mountQueue()
    expect(wrapper.findAll('[data-testid="queue-row"]')).toHaveLength(3)
    expect(wrapper.get('[data-testid="queue-counts"]').text()).toContain('More than 1,000 spectra waiting for your call · 3 shown')
    await wrapper.get('[data-testid="queue-more"]').trigger('click')
    await flushPromises()
    expect(listQueue).toHaveBeenLastCalledWith(expect.anything(), 3)
    expect(wrapper.findAll('[data-testid="queue-row"]').map((r) => r.text())).toEqual([1, 2, 3, 4, 5].map((n) => expect.stringContaining(`KRF ${n}`)))
    expect(wrapper.find('[data-testid="queue-more"]').exists()).toBe(false)
  })

  it('brings the next page when ↓ is pressed on the last row', async () => {
    listQueue.mockImplementation(async (_f, after) =>
      after === undefined ? { items: [item(1), item(2)], more: true, waiting: { count: 3, atLeast: false }, claimMinutes: 10 } : { items: [item(3)], more: false, waiting: null, claimMinutes: 10 },
    )
    const wrapper = await mountQueue()
    expect(wrapper.get('[data-testid="queue-counts"]').text()).toContain('3 spectra waiting for your call · 2 shown')
    for (let i = 0; i < 2; i++) document.body.dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowDown', bubbles: true, cancelable: true }))
    await flushPromises()
    expect(wrapper.findAll('[data-testid="queue-row"]')).toHaveLength(3)
    expect(wrapper.get('[data-testid="queue-counts"]').text()).not.toContain('shown')
  })
})
