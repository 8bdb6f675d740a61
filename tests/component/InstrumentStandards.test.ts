import { mount } from '@vue/test-utils'
import { NConfigProvider } from 'naive-ui'
import { describe, expect, it } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { coverageCell } from '@shared/coverage'
import type { SuggestionDetails } from '@shared/api/suggestions'
import type { InstrumentCandidate } from '@/api/instruments'
import type { LibraryVersionSummary as VersionSummary, StandardSummary } from '@/api/standards'
import StandardsCandidateTable from '@/components/StandardsCandidateTable.vue'
import StandardsCoverageGrid from '@/components/StandardsCoverageGrid.vue'
import SuggestionEvidence from '@/components/SuggestionEvidence.vue'
import { cellsAddedBy, coverageOf, decisionText } from '@/lib/instrumentStandards'

// Invented values in the shapes the API returns.
const router = createRouter({ history: createMemoryHistory(), routes: [{ path: '/:p(.*)*', component: { render: () => null } }] })

function candidate(spectrumId: number, typeCode: number, classCode: number, firstInCell = true): InstrumentCandidate {
  return {
    spectrumId,
    objectName: `KRF 0${spectrumId}`,
    snr: 90,
    decision: {
      classificationId: spectrumId,
      how: 'agreed',
      spectralType: coverageCell(typeCode, classCode).label,
      typeCode,
      luminosityClass: 'V',
      classCode,
      decidedAt: '2026-03-01T10:00:00.000Z',
      decidedBy: { id: 2, name: 'Ilse Varga' },
      calls: [
        { callId: 1, classifier: { id: 2, name: 'Ilse Varga' }, spectralType: 'B2 V', at: '2026-03-01T09:00:00.000Z' },
        { callId: 2, classifier: { id: 3, name: 'Tomasz Achterberg' }, spectralType: 'B2 V', at: '2026-03-01T10:00:00.000Z' },
      ],
    },
    suggestion: { id: 9, spectralType: 'B2 V', libraryVersionId: 1 },
    cell: coverageCell(typeCode, classCode),
    firstInCell,
  }
}

function promoted(id: number, typeCode: number, classCode: number, versionIds: number[]): StandardSummary {
  return {
    id,
    source: 'observed',
    modelId: null,
    templateId: null,
    star: `KRF 0${id}`,
    origin: 'KRO-LRS',
    spectrumId: id,
    spectralType: coverageCell(typeCode, classCode).label,
    typeCode,
    luminosityClass: 'V',
    classCode,
    teff: null,
    logg: null,
    feh: null,
    resolutionFwhm: 3.54,
    note: '',
    addedBy: 1,
    retiredAt: null,
    createdAt: '2026-03-02T00:00:00.000Z',
    versionIds,
    instrumentId: 7,
    provenance: null,
  }
}

describe("coverage of an instrument's standards", () => {
  it('is one cell per subtype and class, the cells a version added named apart', () => {
    const standards = [promoted(1, 12, 6, [2, 3]), promoted(2, 20, 6, [3]), promoted(3, 20, 6, [3])]
    const { cells, titles } = coverageOf(standards)
    // Two A0 V standards share one cell (shared/coverage.ts), whose hover text names both.
    expect(cells.map((c) => c.label).sort()).toEqual(['A0 V', 'B2 V'])
    expect(titles['20|6']).toBe('A0 V: KRF 02; KRF 03')
    const version = {
      id: 3,
      changes: { action: 'promote', instrument: { id: 7, name: 'KRO-LRS' }, note: '', standards: [{ standardId: 2, spectrumId: 2, spectralType: 'A0 V', reason: '' }] },
    } as unknown as VersionSummary
    expect(cellsAddedBy(version, 7, standards).map((c) => c.label)).toEqual(['A0 V'])
    expect(cellsAddedBy(version, 8, standards)).toEqual([])
  })

  it('draws standards, the ones a version added and the gaps candidates would fill', () => {
    const wrapper = mount(StandardsCoverageGrid, { props: { covered: [coverageCell(12, 6), coverageCell(20, 6)], added: [coverageCell(20, 6)], candidates: [coverageCell(15, 2)] } })
    const states = wrapper.findAll('[data-testid="coverage-cell"]').map((c) => c.attributes('data-state'))
    expect(states.sort()).toEqual(['candidate', 'new', 'standard'])
    expect(wrapper.findAll('[role="gridcell"]')).toHaveLength(70 * 7)
  })
})

describe('StandardsCandidateTable', () => {
  it('lets a lead tick one candidate per gap at a time', async () => {
    const selected = ref<number[]>([])
    const Host = defineComponent(
      () => () =>
        h(NConfigProvider, null, () =>
          h(StandardsCandidateTable, {
            candidates: [candidate(11, 12, 6), candidate(12, 12, 6, false), candidate(13, 20, 6)],
            canPromote: true,
            selected: selected.value,
            'onUpdate:selected': (v: number[]) => (selected.value = v),
          }),
        ),
    )
    const wrapper = mount(Host, { global: { plugins: [router] } })
    const boxes = () => wrapper.findAll('[data-testid="candidate-row"] .n-checkbox')
    expect(boxes()).toHaveLength(3)
    await boxes()[0]!.trigger('click')
    expect(selected.value).toEqual([11])
    // The other B2 V is held back while #11 is ticked.
    expect(boxes()[1]!.classes()).toContain('n-checkbox--disabled')
    await boxes()[2]!.trigger('click')
    expect(selected.value.sort()).toEqual([11, 13])
    expect(wrapper.text()).toContain('agreed by Ilse Varga and Tomasz Achterberg')
  })

  it('shows a classifier the candidates without boxes to tick', () => {
    const wrapper = mount(
      defineComponent(() => () => h(NConfigProvider, null, () => h(StandardsCandidateTable, { candidates: [candidate(11, 12, 6)], canPromote: false, selected: [] }))),
      { global: { plugins: [router] } },
    )
    expect(wrapper.findAll('.n-checkbox')).toHaveLength(0)
    expect(wrapper.find('[data-testid="candidate-row"]').attributes('data-cell')).toBe('B2 V')
  })

  it('says who decided a settled spectrum', () => {
    const c = candidate(11, 12, 6)
    expect(decisionText({ ...c.decision, how: 'settled', decidedBy: { id: 1, name: 'Maren Olukoya' } })).toBe('settled by Maren Olukoya')
  })
})

describe('SuggestionEvidence', () => {
  const details = (standards: SuggestionDetails['standards']): SuggestionDetails => ({
    parameters: { teff: null, logg: null, feh: null, standards: 0 },
    classShares: [],
    classNote: null,
    resolution: { fwhm: 3.2, source: 'given', bound: null, level: 3.54 },
    residual: { rms: 0.01, typical: 0.02 },
    notes: [],
    ...(standards ? { standards } : {}),
  })

  it("says which standards decided the suggestion: the instrument's own and the library's", () => {
    const wrapper = mount(SuggestionEvidence, {
      props: {
        details: details({
          instrument: { id: 7, name: 'KRO-LRS' },
          instrumentStandards: 12,
          covered: 0,
          instrumentShare: { type: 0.62, class: 0.55 },
          decidedBy: 'mixed',
          deciding: [
            { standardId: 40, spectralType: 'K0 III', star: 'KRF 0131', origin: 'KRO-LRS', set: 'instrument', typeShare: 0.6, classShare: 0.5 },
            { standardId: 3, spectralType: 'K1 III', star: 'HD 123', origin: 'MILES', set: 'library', typeShare: 0.3, classShare: 0.4 },
          ],
          correction: null,
        }),
      },
    })
    const row = wrapper.find('[data-testid="suggestion-standards"]')
    expect(row.attributes('data-decided-by')).toBe('mixed')
    expect(row.text()).toContain("62 % of the type vote and 55 % of the class vote from KRO-LRS's own standards (12 at this resolution)")
    expect(wrapper.findAll('[data-testid="suggestion-standard-chip"]').map((c) => c.attributes('data-set'))).toEqual(['instrument', 'library'])
  })

  it('says so when the spectrum has no instrument, and says nothing for suggestions made before instruments', () => {
    const none = mount(SuggestionEvidence, {
      props: { details: details({ instrument: null, instrumentStandards: 0, covered: 0, instrumentShare: { type: 0, class: 0 }, decidedBy: 'library', deciding: [], correction: null }) },
    })
    expect(none.find('[data-testid="suggestion-standards"]').text()).toContain("The library's standards (the spectrum names no instrument)")
    const old = mount(SuggestionEvidence, { props: { details: details(undefined) } })
    expect(old.find('[data-testid="suggestion-standards"]').exists()).toBe(false)
  })
})
