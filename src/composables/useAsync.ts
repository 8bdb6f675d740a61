import { ref, shallowRef, type Ref, type ShallowRef } from 'vue'
import { ApiError } from '@/api/http'

export type LoadState = 'idle' | 'loading' | 'done' | 'error'

export interface AsyncData<T> {
  data: ShallowRef<T | null>
  error: Ref<ApiError | null>
  state: Ref<LoadState>
  /** Runs the loader again; a later call wins over an earlier one still in flight. */
  reload: () => Promise<void>
}

/** The shape every per-page composable returns: { data, error, state } plus reload. */
export function useAsync<T>(loader: () => Promise<T>, options: { immediate?: boolean } = {}): AsyncData<T> {
  const data = shallowRef<T | null>(null)
  const error = ref<ApiError | null>(null)
  const state = ref<LoadState>('idle')
  let generation = 0

  async function reload(): Promise<void> {
    const mine = ++generation
    state.value = 'loading'
    error.value = null
    try {
      const value = await loader()
      if (mine !== generation) return
      data.value = value
      state.value = 'done'
    } catch (e) {
      if (mine !== generation) return
      error.value = e instanceof ApiError ? e : new ApiError(0, 'client_error', e instanceof Error ? e.message : String(e))
      state.value = 'error'
    }
  }

  if (options.immediate !== false) void reload()
  return { data, error, state, reload }
}
