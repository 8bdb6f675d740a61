import { DOMWrapper, flushPromises, mount } from '@vue/test-utils'
import { NConfigProvider } from 'naive-ui'
import { describe, expect, it, vi } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import type { AddObservedStandardInput, SpectrumChoice, StandardSummary } from '@/api/standards'
import StandardsAddDialog from '@/components/StandardsAddDialog.vue'
import { checkObservedStandard } from '@/composables/useStandards'

const base = { spectrumId: 12, spectralType: 'A0', luminosityClass: 'V', note: 'Catalogue classification, checked against the model grid.' }

describe('checkObservedStandard', () => {
  it('passes one MK type with a subtype, one class, a spectrum and a source note', () => {
    expect(checkObservedStandard(base)).toEqual({})
    expect(checkObservedStandard({ ...base, spectralType: 'K1.5', luminosityClass: 'IIIb' })).toEqual({})
  })

  it('names each missing field', () => {
    const errors = checkObservedStandard({ spectrumId: null, spectralType: ' ', luminosityClass: '', note: '  ' })
    expect(Object.keys(errors).sort()).toEqual(['luminosityClass', 'note', 'spectralType', 'spectrumId'])
  })

  it('refuses what parseMK cannot read, a type without a subtype, ranges, composites and non-MK kinds', () => {
    expect(checkObservedStandard({ ...base, spectralType: 'Q7' }).spectralType).toMatch(/does not read as MK notation/)
    expect(checkObservedStandard({ ...base, spectralType: 'G' }).spectralType).toMatch(/subtype/)
    expect(checkObservedStandard({ ...base, spectralType: 'G8/K0' }).spectralType).toMatch(/not a range/)
    expect(checkObservedStandard({ ...base, spectralType: 'DA3' }).spectralType).toMatch(/MK type/)
    expect(checkObservedStandard({ ...base, luminosityClass: 'IV-V' }).luminosityClass).toMatch(/not a range/)
    expect(checkObservedStandard({ ...base, spectralType: 'A0V' }).spectralType).toMatch(/own field/)
  })
})

describe('StandardsAddDialog', () => {
  const choices: SpectrumChoice[] = [{ id: 12, objectName: 'KRF 0412', status: 'agreed', campaignCode: 'KRO-NFS26', snr: 84 }]

  function mountDialog(add: (input: AddObservedStandardInput) => Promise<StandardSummary>) {
    const show = ref(true)
    const Host = defineComponent(
      () => () => h(NConfigProvider, null, () => h(StandardsAddDialog, { show: show.value, 'onUpdate:show': (v: boolean) => (show.value = v), add, find: async () => choices })),
    )
    return { wrapper: mount(Host, { attachTo: document.body }), show }
  }

  it('shows what is wrong on the form and sends nothing until it is right', async () => {
    const add = vi.fn<(input: AddObservedStandardInput) => Promise<StandardSummary>>()
    const { wrapper } = mountDialog(add)
    await flushPromises()
    await new DOMWrapper(document.body.querySelector<HTMLInputElement>('[data-testid="standards-add-type"]')!).setValue('G8/K0')
    document.body.querySelector<HTMLButtonElement>('[data-testid="standards-add-submit"]')!.click()
    await flushPromises()

    const dialog = document.body.querySelector('[data-testid="standards-add-dialog"]')!
    expect(dialog.textContent).toContain('Pick the spectrum that shows the standard.')
    expect(dialog.textContent).toContain('Give the luminosity class')
    expect(dialog.textContent).toContain('Say where the classification comes from')
    expect(add).not.toHaveBeenCalled()
    wrapper.unmount()
  })
})
