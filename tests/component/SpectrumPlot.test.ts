import { mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it } from 'vitest'
import SpectrumPlot from '@/components/SpectrumPlot.vue'

const wavelength = Float32Array.from({ length: 200 }, (_, i) => 4000 + i)
const flux = Float32Array.from(wavelength, (w) => 1 - 0.5 * Math.exp(-0.5 * ((w - 4101.7) / 3) ** 2))

describe('SpectrumPlot', () => {
  beforeEach(() => setActivePinia(createPinia()))

  it('draws a chart with one legend entry per curve', () => {
    const wrapper = mount(SpectrumPlot, {
      props: {
        wavelength,
        series: [{ label: 'Observed', values: flux }],
        overlays: [{ label: 'Standard', wavelength: [4000, 4199], flux: [1, 1] }],
        markers: [{ id: 'h-delta', label: 'Hδ', wavelength: 4101.74, family: 'balmer' as const }],
        testid: 'plot-a',
      },
      attachTo: document.body,
    })
    expect(wrapper.get('[data-testid="plot-a"]').attributes('data-points')).toBe('200')
    expect(wrapper.findAll('.uplot')).toHaveLength(1)
    const legend = wrapper.get('.u-legend').text()
    expect(legend).toContain('Observed')
    expect(legend).toContain('Standard')
    wrapper.unmount()
  })

  it('adds a residual panel when asked', () => {
    const wrapper = mount(SpectrumPlot, {
      props: { wavelength, series: [{ label: 'Rectified', values: flux }], overlays: [{ label: 'Standard', wavelength, flux }], residual: true },
      attachTo: document.body,
    })
    expect(wrapper.findAll('.uplot')).toHaveLength(2)
    expect(wrapper.find('[data-testid="spectrum-plot-residual"]').exists()).toBe(true)
    wrapper.unmount()
  })

  it('says so when there is no data, and draws no chart', () => {
    const wrapper = mount(SpectrumPlot, { props: { wavelength: new Float32Array(0), series: [{ label: 'Observed', values: new Float32Array(0) }] } })
    expect(wrapper.get('[data-testid="spectrum-plot-empty"]').text()).toBe('No data in this range.')
    expect(wrapper.find('.uplot').exists()).toBe(false)
  })

  it('emits null on double-click, so the screen can show the whole spectrum again', async () => {
    const wrapper = mount(SpectrumPlot, { props: { wavelength, series: [{ label: 'Observed', values: flux }], region: [4050, 4150] as const }, attachTo: document.body })
    await wrapper.get('.u-over').trigger('dblclick')
    expect(wrapper.emitted('update:region')?.at(-1)).toEqual([null])
    wrapper.unmount()
  })
})
