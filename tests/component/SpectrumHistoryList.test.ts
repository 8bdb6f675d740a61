import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import type { SpectrumHistoryEvent } from '@/api/spectra'
import SpectrumHistoryList, { durationText } from '@/components/SpectrumHistoryList.vue'

// An invented spectrum's life, oldest first, in the shape GET /api/spectra/:id/history returns it.
const events: SpectrumHistoryEvent[] = [
  { at: '2026-11-18T01:58:00.000Z', kind: 'upload', who: { id: 4, name: 'Observer One' }, summary: 'Submitted krf_0224.fits (KRF 0224)', details: {} },
  { at: '2026-11-18T02:00:00.000Z', kind: 'measurement', who: null, summary: 'Measured with pipeline 1.1.0, S/N 65.0', details: {} },
  { at: '2026-11-18T02:00:01.000Z', kind: 'suggestion', who: null, summary: 'Suggested B5 Ib (±0.5 subtypes, ±0.25 classes)', details: {} },
  { at: '2026-11-19T03:58:00.000Z', kind: 'call', who: { id: 2, name: 'Classifier A' }, summary: 'Called B5 Ib (confidence 2/3)', suggestionShown: false, secondsSpent: 97, details: {} },
  { at: '2026-11-19T07:58:00.000Z', kind: 'call', who: { id: 3, name: 'Classifier B' }, summary: 'Called B9 II (confidence 3/3)', suggestionShown: true, secondsSpent: 160, details: {} },
  {
    at: '2026-11-19T08:10:00.000Z',
    kind: 'correction',
    who: { id: 3, name: 'Classifier B' },
    summary: 'Corrected the call to B8 II (confidence 2/3)',
    suggestionShown: true,
    secondsSpent: 3725,
    details: {},
  },
  { at: '2026-11-19T08:10:00.000Z', kind: 'dispute', who: null, summary: 'Disputed: the calls differ by 3 subtypes and 1 classes (tolerance 1 and 1)', details: {} },
  { at: '2026-11-20T07:58:00.000Z', kind: 'settled', who: { id: 1, name: 'Lead One' }, summary: 'Settled as B5 Ib: the first call stands.', details: {} },
]

describe('SpectrumHistoryList', () => {
  it('lists every event in order with what, who and when', () => {
    const wrapper = mount(SpectrumHistoryList, { props: { events, hidden: false } })
    const items = wrapper.findAll('[data-testid="spectrum-history-event"]')
    expect(items.map((i) => i.attributes('data-kind'))).toEqual(['upload', 'measurement', 'suggestion', 'call', 'call', 'correction', 'dispute', 'settled'])
    expect(items[0]!.text()).toContain('Submitted')
    expect(items[0]!.text()).toContain('Observer One')
    expect(items[0]!.find('time').attributes('datetime')).toBe('2026-11-18T01:58:00.000Z')
    expect(items[0]!.text().match(/Submitted/g)).toHaveLength(1)
    expect(items[1]!.text()).toContain('pipeline')
    expect(items[3]!.text()).toContain('Call')
    expect(items[6]!.text()).toContain('automatic')
    expect(items[7]!.text()).toContain('Settled as B5 Ib')
    expect(items[7]!.text()).toContain('Lead One')
    expect(wrapper.find('[data-testid="spectrum-history-hidden"]').exists()).toBe(false)
  })

  it('says for each call whether the suggestion had been shown and how long it took', () => {
    const wrapper = mount(SpectrumHistoryList, { props: { events, hidden: false } })
    const items = wrapper.findAll('[data-testid="spectrum-history-event"]')
    expect(items[3]!.get('[data-testid="spectrum-history-blind"]').text()).toContain('suggestion not shown')
    expect(items[3]!.get('[data-testid="spectrum-history-seconds"]').text()).toContain('1 min 37 s spent')
    expect(items[4]!.get('[data-testid="spectrum-history-shown"]').text()).toContain('suggestion shown')
    expect(items[4]!.get('[data-testid="spectrum-history-seconds"]').text()).toContain('2 min 40 s spent')
    expect(items[5]!.get('[data-testid="spectrum-history-seconds"]').text()).toContain('1 h 2 min spent')
    // Events other than calls carry neither.
    expect(items[0]!.find('[data-testid="spectrum-history-seconds"]').exists()).toBe(false)
    expect(items[6]!.find('[data-testid="spectrum-history-shown"]').exists()).toBe(false)
  })

  it('says when blind review keeps part of the history back, and when there is nothing yet', () => {
    const hidden = mount(SpectrumHistoryList, { props: { events: events.slice(0, 2), hidden: true } })
    expect(hidden.get('[data-testid="spectrum-history-hidden"]').text()).toContain('until you have recorded your own call')
    const empty = mount(SpectrumHistoryList, { props: { events: [], hidden: false } })
    expect(empty.get('[data-testid="spectrum-history-empty"]').text()).toContain('Nothing has happened')
  })
})

describe('durationText', () => {
  it('reads seconds as a person would say them', () => {
    expect(durationText(45)).toBe('45 s')
    expect(durationText(120)).toBe('2 min')
    expect(durationText(97)).toBe('1 min 37 s')
    expect(durationText(3600)).toBe('1 h')
    expect(durationText(null)).toBe('')
    expect(durationText(-1)).toBe('')
  })
})
