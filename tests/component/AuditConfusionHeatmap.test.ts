import { mount, RouterLinkStub } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import type { ConfusionMatrix } from '@/api/audit'
import AuditConfusionHeatmap from '@/components/AuditConfusionHeatmap.vue'

// Three letters, calls against the consensus: 5 B–B, 2 calls of A on B spectra, 4 A–A, 1 F–F.
const matrix: ConfusionMatrix = {
  rowsAre: 'Calls (type letter)',
  columnsAre: 'Consensus (type letter)',
  labels: ['B', 'A', 'F'],
  cells: [
    [
      { count: 5, spectrumIds: [11, 12, 13, 14, 15] },
      { count: 0, spectrumIds: [] },
      { count: 0, spectrumIds: [] },
    ],
    [
      { count: 2, spectrumIds: [21, 22] },
      { count: 4, spectrumIds: [31, 32, 33, 34] },
      { count: 0, spectrumIds: [] },
    ],
    [
      { count: 0, spectrumIds: [] },
      { count: 0, spectrumIds: [] },
      { count: 1, spectrumIds: [41] },
    ],
  ],
  n: 12,
}

const mountHeatmap = () => mount(AuditConfusionHeatmap, { props: { matrix, name: 'calls-type' }, global: { stubs: { RouterLink: RouterLinkStub } } })
const cell = (w: ReturnType<typeof mountHeatmap>, row: string, column: string) => w.get(`[data-testid="heatmap-cell"][data-row="${row}"][data-column="${column}"]`)

describe('AuditConfusionHeatmap', () => {
  it('draws one cell per pair of labels, with its count, and the share on the diagonal', () => {
    const w = mountHeatmap()
    expect(w.findAll('[data-testid="heatmap-cell"]')).toHaveLength(9)
    expect(cell(w, 'A', 'B').attributes('data-count')).toBe('2')
    expect(cell(w, 'A', 'B').text()).toBe('2')
    expect(cell(w, 'B', 'A').text()).toBe('')
    expect(w.text()).toContain('12 compared · 83 % on the diagonal')
  })

  it('shades cells by count and leaves empty cells unshaded and disabled', () => {
    const w = mountHeatmap()
    // Square-root scale from a 12 % floor to 92 % at the largest count (5).
    expect(cell(w, 'B', 'B').attributes('data-shade')).toBe('92')
    expect(cell(w, 'A', 'A').attributes('data-shade')).toBe(String(Math.round(12 + 80 * Math.sqrt(4 / 5))))
    expect(cell(w, 'F', 'F').attributes('data-shade')).toBe(String(Math.round(12 + 80 * Math.sqrt(1 / 5))))
    // Dark cells take white figures.
    expect(cell(w, 'B', 'B').attributes('style')).toContain('color: #fff')
    expect(cell(w, 'B', 'F').attributes('data-shade')).toBe('0')
    expect(cell(w, 'B', 'F').attributes('style')).toBeUndefined()
    expect(cell(w, 'B', 'F').attributes('disabled')).toBeDefined()
  })

  it('lists the spectra behind a picked cell as links to their pages, and closes on a second click', async () => {
    const w = mountHeatmap()
    expect(w.find('[data-testid="heatmap-drill"]').exists()).toBe(false)
    await cell(w, 'A', 'B').trigger('click')
    const drill = w.get('[data-testid="heatmap-drill"]')
    expect(drill.text()).toContain('calls A, consensus B — 2 calls on 2 spectra')
    const links = drill.findAllComponents(RouterLinkStub)
    expect(links.map((l: { props: (key: string) => unknown }) => l.props('to'))).toEqual(['/spectra/21', '/spectra/22'])
    expect(w.emitted('select')?.[0]?.[0]).toMatchObject({ row: 1, column: 0, cell: { count: 2 } })
    expect(cell(w, 'A', 'B').attributes('aria-pressed')).toBe('true')

    await cell(w, 'A', 'B').trigger('click')
    expect(w.find('[data-testid="heatmap-drill"]').exists()).toBe(false)
    expect(w.emitted('select')?.[1]).toEqual([null])
  })

  it('moves the drill-down to another cell when one is picked', async () => {
    const w = mountHeatmap()
    await cell(w, 'B', 'B').trigger('click')
    await cell(w, 'F', 'F').trigger('click')
    const links = w.get('[data-testid="heatmap-drill"]').findAllComponents(RouterLinkStub)
    expect(links.map((l: { props: (key: string) => unknown }) => l.props('to'))).toEqual(['/spectra/41'])
  })
})
