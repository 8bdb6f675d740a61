import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import type { Figure } from '@/api/audit'
import AuditAgreementTable, { type AgreementRow } from '@/components/AuditAgreementTable.vue'

const f = (value: number | null, n: number): Figure => ({ value, n, smallSample: n < 10 })

function row(key: string, label: string, n: number, values: { type: number; within: number; cls: number; withinCls: number; kc: number | null; kl: number; kq: number }): AgreementRow {
  return {
    key,
    label,
    n,
    exactType: f(values.type, n),
    withinOneSubtype: f(values.within, n),
    exactClass: f(values.cls, n),
    withinOneClass: f(values.withinCls, n),
    kappaClass: f(values.kc, n),
    weightedKappaTypeLinear: f(values.kl, n),
    weightedKappaTypeQuadratic: f(values.kq, n),
  }
}

const rows: AgreementRow[] = [
  row('1-2', 'Ilse Varga · Tomasz Achterberg', 42, { type: 0.5714, within: 0.9048, cls: 0.8095, withinCls: 1, kc: 0.6512, kl: 0.7803, kq: 0.9125 }),
  row('1-3', 'Ilse Varga · Maren Olukoya', 4, { type: 0.75, within: 1, cls: 0.5, withinCls: 1, kc: null, kl: -0.1, kq: 0.25 }),
]

describe('AuditAgreementTable', () => {
  const w = mount(AuditAgreementTable, { props: { rows, whoTitle: 'Pair', smallBelow: 10, testid: 'audit-pairs' } })
  const cellsOf = (key: string) =>
    w
      .get(`[data-testid="audit-pairs-row"][data-key="${key}"]`)
      .findAll('td')
      .map((td) => td.text())

  it('draws shares as percentages and κ to two places, with the count', () => {
    const [who, n, exactType, within, exactClass, withinClass, kc, kl, kq] = cellsOf('1-2')
    expect(who).toBe('Ilse Varga · Tomasz Achterberg')
    expect(n).toBe('42')
    expect([exactType, within, exactClass, withinClass]).toEqual(['57.1 %', '90.5 %', '81.0 %', '100 %'])
    expect([kc, kl, kq]).toEqual(['0.65', '0.78', '0.91'])
  })

  it('marks a comparison on few spectra as a small sample, and shows an undefined κ as a dash and a negative one with a minus sign', () => {
    const small = w.get('[data-testid="audit-pairs-row"][data-key="1-3"]')
    expect(small.attributes('data-small')).toBe('true')
    expect(small.find('[data-testid="small-sample"]').exists()).toBe(true)
    expect(small.find('.audit-figure--small').exists()).toBe(true)
    const cells = cellsOf('1-3')
    expect(cells[1]).toContain('small sample')
    expect(cells[1]).toContain('4')
    expect(cells[6]).toBe('—')
    expect(cells[7]).toBe('−0.10')
  })

  it('does not mark a comparison on enough spectra', () => {
    const big = w.get('[data-testid="audit-pairs-row"][data-key="1-2"]')
    expect(big.attributes('data-small')).toBe('false')
    expect(big.find('[data-testid="small-sample"]').exists()).toBe(false)
    expect(big.find('.audit-figure--small').exists()).toBe(false)
  })
})
