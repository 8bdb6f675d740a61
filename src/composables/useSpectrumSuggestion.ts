import { computed, ref, shallowRef, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { ApiError } from '@/api/http'
import type { SpectrumStatus } from '@shared/status'
import type { SpectrumSuggestion, SuggestionCandidate } from '@/api/spectra'
import { column } from '@/lib/series'
import { standardSeries } from './useReview'
import type { LoadState } from './useAsync'

/** A standard drawn over the rectified spectrum: which candidate it is and its rectified flux. */
export interface StandardOverlay {
  candidate: SuggestionCandidate
  /** 0 for the best match, 1 and 2 for the next nearest. */
  rank: number
  wavelength: Float32Array
  flux: Float32Array
}

/** Why there is no suggestion yet, by status. */
export function noSuggestionText(status: SpectrumStatus): string {
  if (status === 'received') return 'No suggestion yet: the spectrum is waiting to be measured. The suggestion appears once it has been measured and matched against the standards.'
  if (status === 'measured') return 'No suggestion yet: the spectrum is measured and waiting to be matched against the standards.'
  if (status === 'failed') return 'No suggestion: processing failed, so the spectrum was never matched against the standards.'
  return 'There is no suggestion for this spectrum.'
}

/** "> 99 %", "63 %", "< 1 %". */
export function probabilityText(p: number | null | undefined): string {
  if (p == null || !Number.isFinite(p)) return '—'
  if (p >= 0.995) return '> 99 %'
  if (p < 0.005) return '< 1 %'
  return `${Math.round(p * 100)} %`
}

/** The rank of a candidate in words, for buttons and legends. */
export const rankText = (rank: number): string => (rank === 0 ? 'best match' : `match ${rank + 1}`)

/** Keeps only well-formed candidates, in the matcher's order. */
export function candidatesOf(raw: unknown): SuggestionCandidate[] {
  if (!Array.isArray(raw)) return []
  return raw.filter((c): c is SuggestionCandidate => c !== null && typeof c === 'object' && typeof (c as SuggestionCandidate).standardId === 'number')
}

/** The candidate drawn first: the suggestion's best standard, else the first candidate. */
export function bestCandidateId(suggestion: SpectrumSuggestion | null): number | null {
  if (!suggestion) return null
  const ids = candidatesOf(suggestion.candidates).map((c) => c.standardId)
  if (suggestion.bestStandardId !== null && ids.includes(suggestion.bestStandardId)) return suggestion.bestStandardId
  return ids[0] ?? null
}

/**
 * The standard overlaid on the spectrum page: the best match to begin with, or another of the three
 * candidates the person picks. `enabled` is false for people who may not read the standards library
 * (observers): then nothing is fetched and `data` stays null.
 */
export function useSpectrumSuggestionOverlay(suggestion: MaybeRefOrGetter<SpectrumSuggestion | null>, enabled: MaybeRefOrGetter<boolean>) {
  const chosenId = ref<number | null>(null)
  const data = shallowRef<StandardOverlay | null>(null)
  const error = ref<ApiError | null>(null)
  const state = ref<LoadState>('idle')
  let generation = 0

  const candidates = computed(() => candidatesOf(toValue(suggestion)?.candidates))

  // A new suggestion (another spectrum, or processed again) starts from its best match.
  watch(
    () => toValue(suggestion)?.id ?? null,
    () => {
      chosenId.value = bestCandidateId(toValue(suggestion))
    },
    { immediate: true },
  )

  watch(
    [chosenId, () => toValue(enabled), candidates],
    async ([id, on]) => {
      const mine = ++generation
      const rank = candidates.value.findIndex((c) => c.standardId === id)
      const candidate = candidates.value[rank]
      if (!on || id === null || !candidate) {
        data.value = null
        error.value = null
        state.value = 'idle'
        return
      }
      state.value = 'loading'
      error.value = null
      try {
        const series = await standardSeries(id)
        if (mine !== generation) return
        const flux = series.columns.rectified ?? column(series, 'flux')
        data.value = { candidate, rank, wavelength: column(series, 'wavelength'), flux }
        state.value = 'done'
      } catch (e) {
        if (mine !== generation) return
        // The spectrum stays drawn without the standard; the panel says what went wrong.
        data.value = null
        error.value = e instanceof ApiError ? e : new ApiError(0, 'client_error', e instanceof Error ? e.message : String(e))
        state.value = 'error'
      }
    },
    { immediate: true },
  )

  /** Draws another candidate; null takes the standard off. */
  function choose(id: number | null): void {
    chosenId.value = id
  }

  return { data, error, state, chosenId, candidates, choose }
}
