import { flushPromises, mount } from '@vue/test-utils'
import { NMessageProvider } from 'naive-ui'
import { createPinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
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
vi.mock('@/api/queue', () => ({ nextQueueItem: (f: unknown, after: number) => nextQueueItem(f, after), claimQueueItem: (id: number) => claimQueueItem(id), releaseQueueItem: (id: number) => releaseQueueItem(id), listQueue: async () => ({ items: [], claimMinutes: 10 }) }))
const standards = [
  { id: 40, spectralType: 'B8 III', typeCode: 18, luminosityClass: 'III', classCode: 4, source: 'model', retiredAt: null },
  { id: 41, spectralType: 'B9 III', typeCode: 19, luminosityClass: 'III', classCode: 4, source: 'model', retiredAt: null },
  { id: 42, spectralType: 'B8 V', typeCode: 18, luminosityClass: 'V', classCode: 6, source: 'model', retiredAt: null },
]
const series = (n: number) => ({ layout: { points: n, total: n, decimated: false, columns: ['wavelength', 'rectified'] }, columns: { wavelength: Float32Array.from({ length: n }, (_, i) => 3900 + i), rectified: new Float32Array(n).fill(1) } })
vi.mock('@/api/reviewSeries', () => ({
  fetchPrepared: async () => series(50),
  fetchStandardSeries: async () => series(50),
  listOverlayStandards: async () => standards,
}))

const suggestion: SuggestionView = {
  id: 3, spectralType: 'B8 III', letter: 'B', subtype: 8, typeCode: 18, luminosityClass: 'III', classCode: 4, uncertaintySubtypes: 1, uncertaintyClasses: 0.5,
  libraryVersionId: 1, pipelineVersion: 'test', bestStandardId: 40, candidates: [{ standardId: 40, spectralType: 'B8 III' }, { standardId: 41, spectralType: 'B9 III' }], votes: [], flags: [], createdAt: '2026-03-01T10:00:00.000Z',
}

function review(id: number, blind: boolean): ReviewData {
  return {
    spectrum: { id, objectName: `KRF 0${id}`, status: 'suggested', statusReason: null, submittedBy: { id: 4, name: 'Rohan Delacroix' }, createdAt: '2026-03-01T10:00:00.000Z', obsDate: null, instrument: '', snr: 80, wavelengthRange: [3850, 5000], dispersion: 1, resolvingPower: null, vMag: null, notes: '' },
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
  await flushPromises()
  return { wrapper, router }
}

const key = (k: string, init: KeyboardEventInit = {}, target: EventTarget = document.body) =>
  target.dispatchEvent(new KeyboardEvent('keydown', { key: k, bubbles: true, cancelable: true, ...init }))

beforeEach(() => {
  recordCall.mockReset()
  getReview.mockReset()
  nextQueueItem.mockReset()
  recordCall.mockResolvedValue({ outcome: 'waiting', call: {}, spectrum: { id: 1, status: 'under_review' }, callsSoFar: 1, callsRequired: 2, classification: null, dispute: null })
})

describe('Spectrum review keys', () => {
  it('accepts the suggestion with a, then claims and opens the next item', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    nextQueueItem.mockResolvedValueOnce({ spectrumId: 12 })
    const { wrapper, router } = await mountAt(11)
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 III')
    key('a')
    await flushPromises()
    expect(recordCall).toHaveBeenCalledWith(11, expect.objectContaining({ acceptedSuggestion: true, confidence: 2 }))
    expect(nextQueueItem).toHaveBeenCalledWith(expect.anything(), 11)
    // The item left behind is given back; only the one being opened is claimed.
    expect(releaseQueueItem).toHaveBeenCalledWith(11)
    expect(claimQueueItem).toHaveBeenCalledWith(12)
    expect(claimQueueItem).not.toHaveBeenCalledWith(11)
    expect(router.currentRoute.value.params.id).toBe('12')
    wrapper.unmount()
  })

  it('moves through the overlays with ] and [, and to neighbours with . and =', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    const { wrapper } = await mountAt(11)
    key(']')
    await flushPromises()
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B9 III')
    key('[')
    await flushPromises()
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 III')
    key('=')
    await flushPromises()
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toContain('B8 V')
    wrapper.unmount()
  })

  it('under blind review ignores a, and records a typed call with Enter', async () => {
    getReview.mockImplementation(async (id: number) => review(id, true))
    nextQueueItem.mockResolvedValueOnce(null)
    const { wrapper, router } = await mountAt(21)
    expect(wrapper.find('[data-testid="blind-note"]').exists()).toBe(true)
    expect(wrapper.get('[data-testid="overlay-current"]').text()).toBe('none')
    key('a')
    await flushPromises()
    expect(recordCall).not.toHaveBeenCalled()

    key('t')
    const typeField = wrapper.get('[data-testid="call-type"]')
    expect(document.activeElement).toBe(typeField.element)
    await typeField.setValue('B9')
    await wrapper.get('[data-testid="call-class"]').setValue('IV')
    key('3', { altKey: true }, typeField.element)
    key('Enter', {}, typeField.element)
    await flushPromises()
    expect(recordCall).toHaveBeenCalledWith(21, expect.objectContaining({ spectralType: 'B9', luminosityClass: 'IV', confidence: 3, acceptedSuggestion: false }))
    // Nothing else waits: back to the queue.
    expect(router.currentRoute.value.name).toBe('reviewQueue')
    wrapper.unmount()
  })

  it('keeps plain letters for the field while typing in it', async () => {
    getReview.mockImplementation(async (id: number) => review(id, false))
    const { wrapper } = await mountAt(11)
    const typeField = wrapper.get('[data-testid="call-type"]')
    ;(typeField.element as HTMLInputElement).focus()
    key('a', {}, typeField.element)
    key('n', {}, typeField.element)
    await flushPromises()
    expect(recordCall).not.toHaveBeenCalled()
    expect(nextQueueItem).not.toHaveBeenCalled()
    wrapper.unmount()
  })
})
