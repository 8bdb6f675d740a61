import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope, nextTick, ref } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import type { SpectrumSuggestion, SpectrumSuggestions } from '@/api/spectra'
import SpectrumSuggestionOverlayBar from '@/components/SpectrumSuggestionOverlayBar.vue'
import SpectrumSuggestionPanel from '@/components/SpectrumSuggestionPanel.vue'
import { candidatesOf, useSpectrumSuggestionOverlay } from '@/composables/useSpectrumSuggestion'

// Invented values in the shape GET /api/spectra/:id returns them.
function suggestion(overrides: Partial<SpectrumSuggestion> = {}): SpectrumSuggestion {
  return {
    id: 41,
    spectrumId: 7,
    measurementId: 9,
    libraryVersionId: 3,
    pipelineVersion: '1.1.0',
    isCurrent: true,
    spectralType: 'B5 Ib',
    letter: 'B',
    subtype: 5,
    typeCode: 15,
    luminosityClass: 'Ib',
    classCode: 2,
    uncertainty: { subtypes: 0.5, classes: 0.25 },
    details: null,
    instrumentId: null,
    bestStandardId: 44,
    candidates: [
      { standardId: 44, spectralType: 'B5 Ib', source: 'model', chi2: 1302.31, reducedChi2: 0.4995, scale: 0.9986, probability: 0.97 },
      { standardId: 50, spectralType: 'B7 Ib', source: 'model', chi2: 1497.67, reducedChi2: 0.5744, scale: 0.9393, probability: 0.02 },
      { standardId: 38, spectralType: 'B3 Ib', source: 'observed', chi2: 1530.41, reducedChi2: 0.587, scale: 1.066, probability: 0.001 },
    ],
    votes: [
      { criterion: 'balmer-wings', name: 'Hγ and Hδ wing depth', value: 0.0446, vote: 'Ib', standards: { Ia: 0.0204, Ib: 0.037, III: 0.1147, V: 0.1655 } },
      { criterion: 'sr-ii-4077/fe-i-4071', name: 'Sr II 4077 / Fe I 4071 depth ratio', value: 0.68, vote: null, note: 'not used for this type' },
    ],
    flags: ['low-snr', 'possible-composite'],
    probabilities: [],
    createdAt: '2026-11-18T02:00:00.000Z',
    ...overrides,
  }
}

const shown = (s: SpectrumSuggestion | null = suggestion()): SpectrumSuggestions => ({ current: s, history: [], hidden: false })

function mountPanel(props: Partial<InstanceType<typeof SpectrumSuggestionPanel>['$props']> & { suggestions: SpectrumSuggestions }) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: { template: '<div />' } },
      { path: '/review/:id', name: 'spectrumReview', component: { template: '<div />' } },
    ],
  })
  return mount(SpectrumSuggestionPanel, {
    props: { status: 'suggested', spectrumId: 7, mayReview: true, canOverlay: true, overlayId: 44, ...props },
    global: { plugins: [router] },
  })
}

describe('SpectrumSuggestionPanel', () => {
  it('says plainly that blind review withholds the suggestion, and links a classifier to the review screen', () => {
    const wrapper = mountPanel({ suggestions: { current: null, history: [], hidden: true } })
    const note = wrapper.get('[data-testid="spectrum-suggestion-hidden"]').text()
    expect(note).toContain('blind review')
    expect(note).toContain('until you have recorded your own call')
    expect(wrapper.get('[data-testid="spectrum-suggestion-review-link"]').attributes('href')).toBe('/review/7')
    expect(wrapper.find('[data-testid="spectrum-suggestion-type"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="suggestion-candidates"]').exists()).toBe(false)
  })

  it('offers no review link to an observer', () => {
    const wrapper = mountPanel({ suggestions: shown(), mayReview: false, canOverlay: false })
    expect(wrapper.find('[data-testid="spectrum-suggestion-review-link"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="spectrum-suggestion-no-overlay"]').text()).toContain('classifiers and leads')
  })

  it('says why there is no suggestion yet for a spectrum still waiting to be measured, and for one that failed', () => {
    expect(
      mountPanel({ suggestions: shown(null), status: 'received' })
        .get('[data-testid="spectrum-suggestion-none"]')
        .text(),
    ).toContain('waiting to be measured')
    expect(
      mountPanel({ suggestions: shown(null), status: 'measured' })
        .get('[data-testid="spectrum-suggestion-none"]')
        .text(),
    ).toContain('waiting to be matched')
    expect(
      mountPanel({ suggestions: shown(null), status: 'failed' })
        .get('[data-testid="spectrum-suggestion-none"]')
        .text(),
    ).toContain('processing failed')
  })

  it('shows the type in MK notation with its uncertainty and the versions that made it', () => {
    const wrapper = mountPanel({ suggestions: shown() })
    expect(wrapper.get('[data-testid="spectrum-suggestion-type"]').text()).toBe('B5 Ib')
    expect(wrapper.get('[data-testid="spectrum-suggestion-uncertainty"]').text()).toBe('± 0.5 subtypes, ± 0.25 classes')
    expect(wrapper.get('[data-testid="spectrum-suggestion-library"]').text()).toBe('version 3')
    expect(wrapper.get('[data-testid="spectrum-suggestion-pipeline"]').text()).toBe('1.1.0')
  })

  it('explains each flag in plain English', () => {
    const wrapper = mountPanel({ suggestions: shown() })
    const flags = wrapper.findAll('[data-testid="suggestion-flag"]')
    expect(flags.map((f) => f.attributes('data-flag'))).toEqual(['low-snr', 'possible-composite'])
    expect(flags[0]!.text()).toContain('Low S/N')
    expect(flags[0]!.text()).toContain('The spectrum is noisy')
    expect(flags[1]!.text()).toContain('Possible composite')
    expect(flags[1]!.text()).toContain('combined light of two stars')
  })

  it('says so when there are no flags', () => {
    const wrapper = mountPanel({ suggestions: shown(suggestion({ flags: [] })) })
    expect(wrapper.get('[data-testid="suggestion-no-flags"]').text()).toContain('No quality flags')
  })

  it('lists the three candidates with χ², reduced χ² and probability, and the criteria votes', () => {
    const wrapper = mountPanel({ suggestions: shown() })
    const rows = wrapper.findAll('[data-testid="suggestion-candidate"]')
    expect(rows).toHaveLength(3)
    const first = rows[0]!.findAll('td').map((td) => td.text())
    expect(first[0]).toContain('B5 Ib')
    expect(first[0]).toContain('best match')
    expect(first.slice(1, 4)).toEqual(['1,302.3', '0.500', '97 %'])
    expect(rows[2]!.text()).toContain('observed standard')
    expect(rows[2]!.text()).toContain('< 1 %')
    const votes = wrapper.findAll('[data-testid="suggestion-vote"]')
    expect(votes).toHaveLength(2)
    expect(votes[0]!.text()).toContain('Ib')
    expect(votes[1]!.text()).toContain('not used')
  })

  it('asks to overlay another candidate when its button is pressed', async () => {
    const wrapper = mountPanel({ suggestions: shown() })
    expect(wrapper.get('[data-testid="suggestion-candidate"][data-standard="44"]').text()).toContain('On the plot')
    await wrapper.get('[data-testid="suggestion-candidate-overlay-50"]').trigger('click')
    expect(wrapper.emitted('overlay')).toEqual([[50]])
  })
})

describe('SpectrumSuggestionOverlayBar', () => {
  it('marks the candidate on the plot and offers the others and none', async () => {
    const wrapper = mount(SpectrumSuggestionOverlayBar, { props: { candidates: candidatesOf(suggestion().candidates), overlayId: 44, state: 'done' } })
    expect(wrapper.get('[data-testid="spectrum-overlay-44"]').attributes('aria-pressed')).toBe('true')
    expect(wrapper.get('[data-testid="spectrum-overlay-38"]').attributes('aria-pressed')).toBe('false')
    await wrapper.get('[data-testid="spectrum-overlay-38"]').trigger('click')
    await wrapper.get('[data-testid="spectrum-overlay-none"]').trigger('click')
    expect(wrapper.emitted('choose')).toEqual([[38], [null]])
  })
})

/** A float32 series response as GET /api/standards/:id/data sends it. */
function standardResponse(id: number, level: number): Response {
  const wl = [4000, 4001, 4002, 4003]
  const body = new Float32Array([...wl, ...wl.map(() => level)])
  return new Response(body.buffer, {
    status: 200,
    headers: { 'content-type': 'application/octet-stream', 'x-series-layout': JSON.stringify({ points: 4, columns: ['wavelength', 'rectified'], standardId: id }) },
  })
}

describe('useSpectrumSuggestionOverlay', () => {
  beforeEach(() => setActivePinia(createPinia()))
  afterEach(() => vi.unstubAllGlobals())

  it('starts from the best standard and switches to the candidate chosen', async () => {
    const fetchMock = vi.fn(async (url: string) => standardResponse(Number(/standards\/(\d+)/.exec(url)?.[1]), url.includes('/9044/') ? 0.9 : 0.8))
    vi.stubGlobal('fetch', fetchMock)
    const s = ref<SpectrumSuggestion | null>(
      suggestion({
        id: 9001,
        bestStandardId: 9044,
        candidates: [
          { standardId: 9044, spectralType: 'A1 V', chi2: 10, reducedChi2: 1.1, probability: 0.8 },
          { standardId: 9050, spectralType: 'A2 V', chi2: 12, reducedChi2: 1.3, probability: 0.2 },
        ],
      }),
    )
    const scope = effectScope()
    const overlay = scope.run(() => useSpectrumSuggestionOverlay(s, true))!
    await flushPromises()
    expect(overlay.chosenId.value).toBe(9044)
    expect(overlay.state.value).toBe('done')
    expect(overlay.data.value?.rank).toBe(0)
    expect(Array.from(overlay.data.value!.flux)[0]).toBeCloseTo(0.9, 6)

    overlay.choose(9050)
    await nextTick()
    await flushPromises()
    expect(overlay.data.value?.candidate.spectralType).toBe('A2 V')
    expect(overlay.data.value?.rank).toBe(1)
    expect(fetchMock.mock.calls.map((c) => String(c[0]))).toEqual([expect.stringContaining('/api/standards/9044/data'), expect.stringContaining('/api/standards/9050/data')])

    overlay.choose(null)
    await flushPromises()
    expect(overlay.data.value).toBeNull()
    scope.stop()
  })

  it('fetches nothing when the person may not see the standards', async () => {
    const fetchMock = vi.fn()
    vi.stubGlobal('fetch', fetchMock)
    const scope = effectScope()
    const overlay = scope.run(() =>
      useSpectrumSuggestionOverlay(suggestion({ id: 9002, bestStandardId: 9070, candidates: [{ standardId: 9070, spectralType: 'F0 V', chi2: 1, reducedChi2: 1, probability: 1 }] }), false),
    )!
    await flushPromises()
    expect(overlay.data.value).toBeNull()
    expect(fetchMock).not.toHaveBeenCalled()
    scope.stop()
  })
})
