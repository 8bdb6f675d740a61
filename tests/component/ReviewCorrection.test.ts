import { flushPromises, mount } from '@vue/test-utils'
import { NMessageProvider } from 'naive-ui'
import { createPinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter, RouterView } from 'vue-router'
import type { CallView, HistoryEvent, ReviewData } from '@/api/calls'
import { ApiError } from '@/api/http'

// The review screen with its API modules replaced: a classifier corrects the call they have standing.
const recordCall = vi.fn()
const getReview = vi.fn()
const getHistory = vi.fn()
vi.mock('@/api/calls', () => ({ getReview: (id: number) => getReview(id), recordCall: (id: number, body: unknown) => recordCall(id, body), getHistory: (id: number) => getHistory(id) }))
vi.mock('@/api/queue', () => ({ nextQueueItem: async () => null, claimQueueItem: async () => ({}), listQueue: async () => ({ items: [], claimMinutes: 10 }) }))
const series = (n: number) => ({
  layout: { points: n, total: n, decimated: false, columns: ['wavelength', 'rectified'] },
  columns: { wavelength: Float32Array.from({ length: n }, (_, i) => 3900 + i), rectified: new Float32Array(n).fill(1) },
})
vi.mock('@/api/reviewSeries', () => ({ fetchPrepared: async () => series(50), fetchStandardSeries: async () => series(50), listOverlayStandards: async () => [] }))

const me = { id: 2, name: 'Ilse Varga' }

function call(over: Partial<CallView>): CallView {
  return {
    id: 7,
    kind: 'call',
    correctsCallId: null,
    by: me,
    spectralType: 'B8 III n',
    letter: 'B',
    subtype: 8,
    typeCode: 18,
    luminosityClass: 'III',
    classCode: 4,
    peculiarities: ['n'],
    notes: 'broad Balmer wings',
    confidence: 3,
    uncertain: false,
    acceptedSuggestion: false,
    suggestionId: null,
    suggestionShown: false,
    secondsSpent: 40,
    createdAt: '2026-03-01T10:05:00.000Z',
    ...over,
  }
}

function review(myCall: CallView | null, canCorrect: boolean): ReviewData {
  return {
    spectrum: {
      id: 31,
      objectName: 'KRF 031',
      status: 'under_review',
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
    campaign: { id: 1, code: 'NFS', name: 'Northern Fields Survey 2026', callsRequired: 2, blindReview: false, typeTolerance: 1, classTolerance: 1, regionMin: 3850, regionMax: 5000 },
    measurement: null,
    suggestion: null,
    hidden: false,
    claim: null,
    calls: myCall ? [myCall] : [],
    othersHidden: false,
    callsSoFar: myCall ? 1 : 0,
    callsRequired: 2,
    myCall,
    canCall: { allowed: false, reason: 'You have recorded your call on this spectrum.', code: 'already_called' },
    canCorrect,
    dispute: null,
    classification: null,
  }
}

const event = (kind: HistoryEvent['kind'], summary: string, at: string): HistoryEvent => ({ at, kind, who: me, summary, details: {} })

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

const valueOf = (wrapper: ReturnType<typeof mount>, id: string) => (wrapper.get(`[data-testid="${id}"]`).element as HTMLInputElement).value

async function openHistory(wrapper: ReturnType<typeof mount>) {
  const tab = wrapper.findAll('.n-tabs-tab').find((t) => t.text() === 'History')!
  await tab.trigger('click')
  await flushPromises()
}

beforeEach(() => {
  recordCall.mockReset()
  getReview.mockReset()
  getHistory.mockReset()
  getHistory.mockResolvedValue([event('call', 'Call B8 III n', '2026-03-01T10:05:00.000Z')])
})

describe('Correcting my call on the review screen', () => {
  it('opens the call form from the standing call, sends correctsCallId, then shows the corrected call and lists it in the history', async () => {
    getReview.mockResolvedValueOnce(review(call({}), true))
    const { wrapper, router } = await mountAt(31)
    await openHistory(wrapper)
    expect(wrapper.findAll('[data-testid="history-event"]').map((e) => e.attributes('data-kind'))).toEqual(['call'])

    expect(wrapper.find('[data-testid="call-form"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="my-call"]').text()).toContain('B8 III n')
    await wrapper.get('[data-testid="my-call-correct"]').trigger('click')

    expect(wrapper.get('[data-testid="call-correcting"]').text()).toContain('Correcting your call B8 III n')
    expect(wrapper.find('[data-testid="my-call-correct"]').exists()).toBe(false)
    expect([valueOf(wrapper, 'call-type'), valueOf(wrapper, 'call-class'), valueOf(wrapper, 'call-peculiarities'), valueOf(wrapper, 'call-note')]).toEqual(['B8', 'III', 'n', 'broad Balmer wings'])
    expect(wrapper.get('[data-testid="call-submit"]').text()).toContain('Record correction')

    const corrected = call({
      id: 9,
      kind: 'correction',
      correctsCallId: 7,
      spectralType: 'B9 IV n',
      letter: 'B',
      subtype: 9,
      typeCode: 19,
      luminosityClass: 'IV',
      classCode: 5,
      createdAt: '2026-03-01T10:20:00.000Z',
    })
    recordCall.mockResolvedValueOnce({ outcome: 'waiting', call: corrected, spectrum: { id: 31, status: 'under_review' }, callsSoFar: 1, callsRequired: 2, classification: null, dispute: null })
    getReview.mockResolvedValueOnce(review(corrected, true))
    getHistory.mockResolvedValueOnce([event('call', 'Call B8 III n', '2026-03-01T10:05:00.000Z'), event('correction', 'Corrected to B9 IV n', '2026-03-01T10:20:00.000Z')])

    await wrapper.get('[data-testid="call-type"]').setValue('B9')
    await wrapper.get('[data-testid="call-class-IV"]').trigger('click')
    await wrapper.get('[data-testid="call-submit"]').trigger('click')
    await flushPromises()

    expect(recordCall).toHaveBeenCalledTimes(1)
    expect(recordCall).toHaveBeenCalledWith(
      31,
      expect.objectContaining({ spectralType: 'B9', luminosityClass: 'IV', peculiarities: 'n', notes: 'broad Balmer wings', confidence: 3, acceptedSuggestion: false, correctsCallId: 7 }),
    )
    // The correction stays on this spectrum: the review is read again, nothing moves on.
    expect(getReview).toHaveBeenCalledTimes(2)
    expect(router.currentRoute.value.params.id).toBe('31')
    expect(wrapper.find('[data-testid="call-form"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="my-call"]').text()).toContain('B9 IV n (corrected)')
    expect(wrapper.findAll('[data-testid="history-event"]').map((e) => e.attributes('data-kind'))).toEqual(['call', 'correction'])
    wrapper.unmount()
  })

  it('shows a refusal from the server in the form’s error line and keeps the form open', async () => {
    getReview.mockResolvedValue(review(call({}), true))
    recordCall.mockRejectedValueOnce(new ApiError(409, 'not_latest', 'Correct your standing call (#8), not an earlier one.'))
    const { wrapper } = await mountAt(31)
    await wrapper.get('[data-testid="my-call-correct"]').trigger('click')
    expect(wrapper.find('[data-testid="call-error"]').exists()).toBe(false)
    await wrapper.get('[data-testid="call-submit"]').trigger('click')
    await flushPromises()

    expect(recordCall).toHaveBeenCalledWith(31, expect.objectContaining({ spectralType: 'B8', luminosityClass: 'III', correctsCallId: 7 }))
    expect(wrapper.get('[data-testid="call-error"]').text()).toBe('Correct your standing call (#8), not an earlier one.')
    expect(wrapper.find('[data-testid="call-correcting"]').exists()).toBe(true)
    expect(getReview).toHaveBeenCalledTimes(1)
    wrapper.unmount()
  })

  it('puts the standing call back with "Keep it", and offers no correction once the spectrum is closed', async () => {
    getReview.mockResolvedValueOnce(review(call({}), true))
    const { wrapper } = await mountAt(31)
    await wrapper.get('[data-testid="my-call-correct"]').trigger('click')
    await wrapper.get('[data-testid="call-correcting-cancel"]').trigger('click')
    expect(wrapper.find('[data-testid="call-form"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="my-call-correct"]').exists()).toBe(true)
    expect(recordCall).not.toHaveBeenCalled()
    wrapper.unmount()

    getReview.mockResolvedValueOnce({ ...review(call({}), false), canCall: { allowed: false, reason: 'The spectrum is agreed and takes no calls.', code: 'not_open' } })
    const closed = await mountAt(31)
    expect(closed.wrapper.get('[data-testid="my-call"]').text()).toContain('B8 III n')
    expect(closed.wrapper.find('[data-testid="my-call-correct"]').exists()).toBe(false)
    expect(closed.wrapper.find('[data-testid="call-form"]').exists()).toBe(false)
    closed.wrapper.unmount()
  })
})
