import { computed, watch, type Ref } from 'vue'
import { parseMK, type MKValue } from '@shared/mk'
import { getStandardSeries, getStandardsLibrary, type LibraryVersionSummary, type StandardSummary } from '@/api/standards'
import type { DecodedSeries } from '@/lib/series'
import { useAsync, type AsyncData } from './useAsync'

/** The library: every version and every standard; `versionId` picks whose standards are shown (the active one by default). */
export function useStandards(versionId: Ref<number | null>) {
  const library = useAsync(getStandardsLibrary)

  // The active version first, then the newest.
  const versions = computed(() => [...(library.data.value?.versions ?? [])].sort((a, b) => Number(b.isActive) - Number(a.isActive) || b.id - a.id))
  const activeVersion = computed(() => versions.value.find((v) => v.isActive) ?? null)
  const shownVersion = computed<LibraryVersionSummary | null>(() => versions.value.find((v) => v.id === versionId.value) ?? activeVersion.value)
  /** The shown version's standards; with `pending` on, also the live standards not yet in any version. */
  const standardsOf = (pending: boolean) =>
    (library.data.value?.standards ?? []).filter((s) => (shownVersion.value ? s.versionIds.includes(shownVersion.value.id) : false) || (pending && s.versionIds.length === 0 && s.retiredAt === null))

  /** Keeps the list in step after a change without a full reload. */
  function replaceStandard(standard: StandardSummary): void {
    const lib = library.data.value
    if (!lib) return
    const found = lib.standards.some((s) => s.id === standard.id)
    library.data.value = { ...lib, standards: found ? lib.standards.map((s) => (s.id === standard.id ? standard : s)) : [...lib.standards, standard] }
  }

  return { ...library, versions, activeVersion, shownVersion, standardsOf, replaceStandard }
}

/** Plot data for the chosen standards, fetched once per standard for the life of the screen. */
export function useStandardSeries(ids: Ref<readonly number[]>): AsyncData<Array<{ id: number; series: DecodedSeries }>> {
  const cache = new Map<number, Promise<DecodedSeries>>()
  const load = (id: number) => {
    let p = cache.get(id)
    if (!p) {
      p = getStandardSeries(id)
      p.catch(() => cache.delete(id))
      cache.set(id, p)
    }
    return p
  }
  const series = useAsync(async () => Promise.all(ids.value.map(async (id) => ({ id, series: await load(id) }))), { immediate: ids.value.length > 0 })
  watch(
    () => ids.value.join(','),
    () => void series.reload(),
  )
  return series
}

export interface ObservedStandardForm {
  spectrumId: number | null
  spectralType: string
  luminosityClass: string
  note: string
}

/**
 * What is wrong with an observed-standard form, by field (empty when it may be sent). The type and class
 * must read together as MK notation with one subtype and one class, as the server will insist.
 */
export function checkObservedStandard(form: ObservedStandardForm): Partial<Record<keyof ObservedStandardForm, string>> {
  const errors: Partial<Record<keyof ObservedStandardForm, string>> = {}
  if (form.spectrumId === null) errors.spectrumId = 'Pick the spectrum that shows the standard.'
  const type = form.spectralType.trim()
  const cls = form.luminosityClass.trim()
  if (!type) errors.spectralType = 'Give the authoritative spectral type, e.g. A0 or K1.5.'
  if (!cls) errors.luminosityClass = 'Give the luminosity class, e.g. V or IIIb.'
  if (type && classOfTypeField(type) !== undefined) errors.spectralType = 'Write the class in its own field, not after the type.'
  else if (type && cls) {
    const parsed = parseMK(`${type} ${cls}`)
    if (!parsed.ok) errors.spectralType = `“${type} ${cls}” does not read as MK notation (${parsed.reason}).`
    else {
      const v = parsed.value
      if (v.kind !== 'mk') errors.spectralType = 'A standard needs an MK type (O to M), not a white dwarf, carbon, S or Wolf–Rayet type.'
      else if (v.composite) errors.spectralType = 'A standard is one star: leave out the composite part.'
      else if (v.typeCode === undefined) errors.spectralType = 'Give a subtype, e.g. G2 rather than G.'
      else if (v.typeRange) errors.spectralType = 'Give one type, not a range or intermediate type.'
      else if (v.classCode === undefined || v.luminosityClass === undefined) errors.luminosityClass = `“${cls}” is not a luminosity class.`
      else if (v.classRange) errors.luminosityClass = 'Give one luminosity class, not a range.'
    }
  }
  if (!form.note.trim()) errors.note = 'Say where the classification comes from (a catalogue, a paper, your own reading against standards).'
  return errors
}

function classOfTypeField(type: string): string | undefined {
  const parsed = parseMK(type)
  return parsed.ok ? (parsed.value as MKValue).luminosityClass : undefined
}
