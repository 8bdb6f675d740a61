import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import type { SuggestionView } from '@/api/calls'
import ReviewSuggestionCard from '@/components/ReviewSuggestionCard.vue'
import SuggestionVotesTable from '@/components/SuggestionVotesTable.vue'

const suggestion: SuggestionView = {
  id: 7,
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
    { standardId: 40, spectralType: 'B8 III', chi2: 210, reducedChi2: 1.1, probability: 0.71 },
    { standardId: 41, spectralType: 'B9 III', chi2: 230, reducedChi2: 1.2, probability: 0.2 },
  ],
  votes: [{ criterion: 'balmer-wings', name: 'Hγ and Hδ wing depth', value: 0.12, vote: 'III', standards: { III: 0.11, V: 0.2 } }],
  flags: ['low-snr'],
  createdAt: '2026-03-01T10:00:00.000Z',
}

describe('blind review', () => {
  it('shows the note instead of the suggestion while the server withholds it', () => {
    const wrapper = mount(ReviewSuggestionCard, { props: { suggestion: null, hidden: true, overlayId: null } })
    expect(wrapper.get('[data-testid="blind-note"]').text()).toContain('the suggestion appears after your call')
    expect(wrapper.find('[data-testid="suggestion-type"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid^="candidate-"]').exists()).toBe(false)
  })

  it('hides the criteria votes too', () => {
    const wrapper = mount(SuggestionVotesTable, { props: { votes: [], hidden: true, compact: true } })
    expect(wrapper.text()).toContain('Hidden under blind review')
    expect(wrapper.find('[data-testid="vote-row"]').exists()).toBe(false)
  })

  it('shows the suggestion, its flags and nearest standards once it may be seen', async () => {
    const wrapper = mount(ReviewSuggestionCard, { props: { suggestion, hidden: false, overlayId: 40 } })
    expect(wrapper.find('[data-testid="blind-note"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="suggestion-type"]').text()).toBe('B8 III')
    expect(wrapper.get('[data-testid="suggestion-flag"]').text()).toBe('Low S/N')
    await wrapper.get('[data-testid="candidate-41"]').trigger('click')
    expect(wrapper.emitted('overlay')?.[0]).toEqual([41])
  })

  it('lists the votes with the class each criterion prefers', () => {
    const wrapper = mount(SuggestionVotesTable, { props: { votes: suggestion.votes, hidden: false, compact: true } })
    const row = wrapper.get('[data-testid="vote-row"]')
    expect(row.text()).toContain('Hγ and Hδ wing depth')
    expect(row.text()).toContain('III')
    expect(row.text()).toContain('standards: III 0.110 · V 0.200')
  })

  it('says why when the suggestion is not the nearest single standard', () => {
    const between = { ...suggestion, spectralType: 'B8.5 III', candidates: [{ standardId: 41, spectralType: 'B9 III', reducedChi2: 1.1, probability: 0.6 }] }
    const wrapper = mount(ReviewSuggestionCard, { props: { suggestion: between, hidden: false, overlayId: null } })
    expect(wrapper.get('[data-testid="suggestion-why"]').text()).toContain('The nearest single standard is B9 III')
    const same = mount(ReviewSuggestionCard, { props: { suggestion, hidden: false, overlayId: null } })
    expect(same.find('[data-testid="suggestion-why"]').exists()).toBe(false)
  })
})
