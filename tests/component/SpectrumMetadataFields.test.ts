import { mount } from '@vue/test-utils'
import { NForm } from 'naive-ui'
import { describe, expect, it } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import SpectrumMetadataFields from '@/components/SpectrumMetadataFields.vue'
import type { MetadataDraft } from '@/lib/spectrumMetadata'
import { flush } from './helpers'

const draft = (resolution: number | null): MetadataDraft => ({
  objectName: 'KRO-118',
  ra: '',
  dec: '',
  obsDate: null,
  instrument: '',
  instrumentId: 7,
  resolutionKind: 'fwhm',
  resolution,
  vMag: null,
  parallaxMas: null,
  parallaxErrorMas: null,
  ebv: null,
  notes: '',
})

function mountFields(resolution: number | null) {
  const model = ref(draft(resolution))
  const wrapper = mount(
    defineComponent(
      () => () =>
        h(NForm, null, () =>
          h(SpectrumMetadataFields, {
            modelValue: model.value,
            'onUpdate:modelValue': (v: MetadataDraft) => (model.value = v),
            instruments: [{ id: 7, name: 'Kestrel long-slit', resolutionFwhm: 3.2 }],
          }),
        ),
    ),
  )
  return { wrapper, model }
}

describe('SpectrumMetadataFields', () => {
  it("says the instrument's resolution stands in only while the field is empty", async () => {
    const empty = mountFields(null)
    await flush()
    expect(empty.wrapper.text()).toContain("Empty: the instrument's 3.2 Å")
    empty.model.value = { ...empty.model.value, resolution: 2.1 }
    await flush()
    expect(empty.wrapper.text()).not.toContain("Empty: the instrument's")
  })
})
