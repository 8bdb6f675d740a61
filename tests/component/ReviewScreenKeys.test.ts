import { flushPromises, mount } from '@vue/test-utils'
import { NMessageProvider } from 'naive-ui'
import { createPinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter, RouterView } from 'vue-router'
import type { ReviewData, SuggestionView } from '@/api/calls'

// The working screen with its API modules replaced: the keys alone record calls and move on.
const recordCall = vi.fn()
const getReview = vi.fn()
const nextQueueItem = vi.fn()
const claimQueueItem = vi.fn(async (_id: number) => ({}))
const releaseQueueItem = vi.fn(async (_id: number) => undefined)
vi.mock('@/api/calls', () => ({ getReview: (id: number) => getReview(id), recordCall: (id: number, body: unknown) => recordCall(id, body), getHistory: async () => [] }))
vi.mock('@/api/queue', () => ({
  nextQueueItem: (f: unknown, after: number) => nextQueueItem(f, after),
  claimQueueItem: (id: number) => claimQueueItem(id),
  releaseQueueItem: (id: number) => releaseQueueItem(id),
  listQueue: async () => ({ items: [], claimMinutes: 10 }),
}))
const standards = [
  { id: 40, spectralType: 'B8 III', typeCode: 18, luminosityClass: 'III', classCode: 4, source: 'model', retiredAt: null },
  { id: 41, spectralType: 'B9 III', typeCode: 19, luminosityClass: 'III', classCode: 4, source: 'model', retiredAt: null },
  { id: 42, spectralType: 'B8 V', typeCode: 18, luminosityClass: 'V', classCode: 6, source: 'model', retiredAt: null },
]
const series = (n: number) => ({
  layout: { points: n, total: n, decimated: false, columns: ['wavelength', 'rectified'] },
  columns: { wavelength: Float32Array.from({ length: n }, (_, i) => 3850 + i), rectified: new Float32Array(n).fill(1) },
})
vi.mock('@/api/reviewSeries', () => ({
  fetchPrepared: async () => series(1200),
  fetchStandardSeries: async () => series(1200),
  listOverlayStandards: async () => standards,
}))

const suggestion: SuggestionView = {
  id: 3,
  spectralType: 'B8 III',
  letter: 'B',
  subtype: 8,
  typeCode: 18,
  luminosityClass: 'III',
  classCode: 4,
  uncertaintySubtypes: 1,
  uncertaintyClasses: 0.5,
  libraryVersionId: 1,
  pipelineVersion: 'test',
  bestStandardId: 40,
  candidates: [
    { standardId: 40, spectralType: 'B8 III' },
    { standardId: 41, spectralType: 'B9 III' },
  ],
  votes: [],
  flags: [],
  createdAt: '2026-03-01T10:00:00.000Z',
}

function review(id: number, blind: boolean): ReviewData {
  return {
    spectrum: {
      id,
      objectName: `KRF 0${id}`,
      status: 'suggested',
      statusReason: null,
      submittedBy: { id: 4, name: 'Rohan Delacroix' },
      createdAt: '2026-03-01T10:00:00.000Z',
      obsDate: null,
      instrument: '',
      snr: 80,
      wavelengthRange: [3850, 5000],
      dispersion: 1,
      resolvingPower: null,
      vMag: null,
      notes: '',
    },
    campaign: { id: 1, code: 'NFS', name: 'Northern Fields Survey 2026', callsRequired: 2, blindReview: blind, typeTolerance: 1, classTolerance: 1, regionMin: 3850, regionMax: 5000 },
    measurement: null,
    suggestion: blind ? null : suggestion,
    hidden: blind,
    claim: { spectrumId: id, mine: true, by: { id: 2, name: 'Ilse Varga' }, claimedAt: '2026-03-01T10:00:00.000Z', expiresAt: '2026-03-01T10:10:00.000Z', live: true },
    calls: [],
    othersHidden: blind,
    callsSoFar: 0,
    callsRequired: 2,
    myCall: null,
    canCall: { allowed: true, reason: null, code: null },
    canCorrect: false,
    dispute: null,
    classification: null,
  }
}

async function mountAt(id: number) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/review', name: 'reviewQueue', component: { render: () => h('p', 'queue') } },
      { path: '/review/:id', name: 'spectrumReview', component: () => import('@/views/SpectrumReviewView.vue') },
    ],
  })
  await router.push(`/review/${id}`)
  const Host = defineComponent({ setup: () => () => h(NMessageProvider, null, () => h(RouterView)) })
  const wrapper = mount(Host, { global: { plugins: [router, createPinia()] }, attachTo: document.body })
  mounted.push(wrapper)
  await flushPromises()
  return { wrapper, router }
}

const key = (k: string, init: KeyboardEventInit = {}, target: EventTarget = document.body) => target.dispatchEvent(new KeyboardEvent('keydown', { key: k, bubbles: true, cancelable: true, ...init }))

const mounted: { unmount(): void }[] = []
afterEach(() => {
  // A failed test must not leave its key handler on the window for the next one.
  for (const w of mounted.splice(0)) {
    try {
      w.unmount()
    } catch {
      // already unmounted by the test
    }
  }
})

beforeEach(() => {
  recordCall.mockReset()
  getReview.mockReset()
  nextQueueItem.mockReset()
  claimQueueItem.mockClear()
  recordCall.mockResolvedValue({ outcome: 'waiting', call: {}, spectrum: { id: 1, status: 'under_review' }, callsSoFar: 1, callsRequired: 2, classification: null, dispute: null })
})

describe('Spectrum review keys', () => {
  it('takes the suggestion with y, then claims and opens the next item of the same campaign', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    nextQueueItem.mockResolvedValueOnce({ spectrumId: 12 })
    const { wrapper, router } = await mountAt(11)
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 III')
    key('y')
    await flushPromises()
    expect(recordCall).toHaveBeenCalledWith(11, expect.objectContaining({ acceptedSuggestion: true, confidence: 2 }))
    expect(nextQueueItem).toHaveBeenCalledWith(expect.objectContaining({ campaign: 1 }), 11)
    // The item left behind is given back; only the one being opened is claimed.
    expect(releaseQueueItem).toHaveBeenCalledWith(11)
    expect(claimQueueItem).toHaveBeenCalledWith(12)
    expect(claimQueueItem).not.toHaveBeenCalledWith(11)
    expect(router.currentRoute.value.params.id).toBe('12')
    wrapper.unmount()
  })

  it('walks the neighbour matrix with the arrows and shows the highlighted standard with Enter', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    const { wrapper } = await mountAt(11)
    expect(wrapper.get('[data-testid="matrix-tile-0-0"]').text()).toContain('B8 III')
    key('ArrowRight')
    await flushPromises()
    expect(wrapper.get('[data-testid="matrix-tile-0-1"]').attributes('aria-selected')).toBe('true')
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 III')
    key('Enter')
    await flushPromises()
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B9 III')
    // Picking re-centres the matrix on the picked standard.
    expect(wrapper.get('[data-testid="matrix-tile-0-0"]').text()).toContain('B9 III')
    key('Home')
    await flushPromises()
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 III')
    key('ArrowDown')
    key('ArrowDown')
    key('Enter')
    await flushPromises()
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 V')
    wrapper.unmount()
  })

  it('steps through the region strip with r and R, and back to the whole region with w', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    const { wrapper } = await mountAt(11)
    expect(wrapper.get('[data-testid="region-whole"]').attributes('aria-pressed')).toBe('true')
    key('r')
    await flushPromises()
    expect(wrapper.get('[data-testid="region-violet"]').attributes('aria-pressed')).toBe('true')
    key('R')
    key('R')
    await flushPromises()
    expect(wrapper.get('[data-testid="region-whole"]').attributes('aria-pressed')).toBe('false')
    key('w')
    await flushPromises()
    expect(wrapper.get('[data-testid="region-whole"]').attributes('aria-pressed')).toBe('true')
    wrapper.unmount()
  })

  it('under blind review says why y does nothing, and after a typed call shows the suggestion before moving on', async () => {
    getReview.mockImplementation(async (id: number) => review(id, true))
    const { wrapper, router } = await mountAt(21)
    expect(wrapper.find('[data-testid="blind-note"]').exists()).toBe(true)
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('blind review')
    key('y')
    await flushPromises()
    expect(recordCall).not.toHaveBeenCalled()
    expect(document.body.textContent).toContain('Blind review: the suggestion is hidden until you record your own call')

    key('/')
    const typeField = wrapper.get('[data-testid="call-type"]')
    expect(document.activeElement).toBe(typeField.element)
    await typeField.setValue('B9')
    await wrapper.get('[data-testid="call-class"]').setValue('IV')
    key('3', { altKey: true }, typeField.element)
    // Once called, the server shows the suggestion.
    getReview.mockImplementation(async (id: number) => ({ ...review(id, false), canCall: { allowed: false, reason: 'You have recorded your call on this spectrum.', code: 'already_called' } }))
    key('Enter', {}, typeField.element)
    await flushPromises()
    expect(recordCall).toHaveBeenCalledWith(21, expect.objectContaining({ spectralType: 'B9', luminosityClass: 'IV', confidence: 3, acceptedSuggestion: false }))
    expect(router.currentRoute.value.params.id).toBe('21')
    expect(wrapper.get('[data-testid="reveal-suggestion"]').text()).toBe('B8 III')
    nextQueueItem.mockResolvedValueOnce(null)
    key(' ')
    await flushPromises()
    expect(router.currentRoute.value.name).toBe('reviewQueue')
    wrapper.unmount()
  })

  it('keeps plain letters for the field while typing in it', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    const { wrapper } = await mountAt(11)
    const typeField = wrapper.get('[data-testid="call-type"]')
    ;(typeField.element as HTMLInputElement).focus()
    key('y', {}, typeField.element)
    key(' ', {}, typeField.element)
    await flushPromises()
    expect(recordCall).not.toHaveBeenCalled()
    expect(nextQueueItem).not.toHaveBeenCalled()
    wrapper.unmount()
  })

  it('shows someone else’s claim read-only instead of the call form', async () => {
    getReview.mockImplementation(async (id: number) => ({
      ...review(id, false),
      claim: { spectrumId: id, mine: false, by: { id: 9, name: 'Tomas Reyes' }, claimedAt: '2026-03-01T10:00:00.000Z', expiresAt: '2999-03-01T10:10:00.000Z', live: true },
      canCall: { allowed: false, reason: 'Tomas Reyes is working on this spectrum.', code: 'claimed' },
    }))
    const { wrapper } = await mountAt(31)
    expect(wrapper.get('[data-testid="claimed-by-other"]').text()).toContain('Claimed by Tomas Reyes until')
    expect(wrapper.find('[data-testid="call-form"]').exists()).toBe(false)
    expect(claimQueueItem).not.toHaveBeenCalledWith(31)
    wrapper.unmount()
  })
})
