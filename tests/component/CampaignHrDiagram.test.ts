import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import CampaignHrDiagram from '@/components/CampaignHrDiagram.vue'
import type { HrDiagram } from '@shared/api/campaigns'
import { luminosityFromRadius } from '@shared/derived'

const diagram: HrDiagram = {
  campaign: { id: 1, code: 'NFS', name: 'Northern Fields Survey 2026' },
  points: [
    { spectrumId: 11, objectName: 'KRF 011', status: 'agreed', spectralType: 'G2 V', basis: 'classification', logTeff: Math.log10(5772), logL: 0, eLogTeff: 0.01, eLogL: 0.1 },
    { spectrumId: 12, objectName: 'KRF 012', status: 'disputed', spectralType: 'K0 III', basis: 'suggestion', logTeff: Math.log10(4800), logL: 1.8, eLogTeff: 0.01, eLogL: 0.2 },
  ],
  left: 1,
}

describe('CampaignHrDiagram', () => {
  it('draws each star coloured by its state, hollow while only suggested, and opens it on click', async () => {
    const wrapper = mount(CampaignHrDiagram, { props: { diagram } })
    const agreed = wrapper.get('[data-testid="hr-point-11"]')
    const disputed = wrapper.get('[data-testid="hr-point-12"]')
    expect(agreed.get('circle').attributes('fill')).toBe(agreed.get('circle').attributes('stroke'))
    expect(disputed.get('circle').attributes('fill')).not.toBe(disputed.get('circle').attributes('stroke'))
    expect(agreed.get('circle').attributes('stroke')).not.toBe(disputed.get('circle').attributes('stroke'))
    await disputed.trigger('click')
    expect(wrapper.emitted('open')).toEqual([[12]])
    expect(wrapper.text()).toContain('1 spectrum has no position')
  })

  it('draws lines of constant radius, the 1 R☉ line through the Sun (IAU 2015: L☉ = 4πR☉²σ·5772⁴)', () => {
    const wrapper = mount(CampaignHrDiagram, { props: { diagram } })
    const lines = wrapper.findAll('[data-testid="hr-radius"]')
    expect(lines).toHaveLength(6)
    // log L of R = 1 R☉ at the Sun's Teff is 0 to 0.01 % (REFERENCE.md check); the Sun sits on the line.
    expect(Math.log10(luminosityFromRadius(1, 5772))).toBeCloseTo(0, 4)
    const one = lines.find((l) => l.text() === '1 R☉')!.get('line')
    const [x1, y1, x2, y2] = ['x1', 'y1', 'x2', 'y2'].map((a) => Number(one.attributes(a)))
    const sun = wrapper.get('[data-testid="hr-point-11"] circle')
    const cx = Number(sun.attributes('cx'))
    const cy = Number(sun.attributes('cy'))
    // The line is straight in (log T, log L): L ∝ T⁴ at fixed R.
    const yAt = y1! + ((y2! - y1!) * (cx - x1!)) / (x2! - x1!)
    expect(Math.abs(yAt - cy)).toBeLessThan(0.5)
  })
})
