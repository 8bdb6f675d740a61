import { defineStore } from 'pinia'
import { computed, ref } from 'vue'

export type ThemeMode = 'light' | 'dark'
export type ThemeChoice = ThemeMode | 'system'

const STORAGE_KEY = 'lineweight.theme'

function readChoice(): ThemeChoice {
  try {
    const stored = globalThis.localStorage?.getItem(STORAGE_KEY)
    return stored === 'light' || stored === 'dark' ? stored : 'system'
  } catch {
    return 'system'
  }
}

/** Light or dark; follows the operating system until the person picks one, then remembers the pick. */
export const useThemeStore = defineStore('theme', () => {
  const choice = ref<ThemeChoice>(readChoice())
  const media = typeof globalThis.matchMedia === 'function' ? globalThis.matchMedia('(prefers-color-scheme: dark)') : null
  const systemDark = ref(media?.matches ?? false)
  media?.addEventListener?.('change', (event) => {
    systemDark.value = event.matches
  })

  const mode = computed<ThemeMode>(() => (choice.value === 'system' ? (systemDark.value ? 'dark' : 'light') : choice.value))
  const dark = computed(() => mode.value === 'dark')

  function choose(next: ThemeChoice): void {
    choice.value = next
    try {
      if (next === 'system') globalThis.localStorage?.removeItem(STORAGE_KEY)
      else globalThis.localStorage?.setItem(STORAGE_KEY, next)
    } catch {
      // Private windows may refuse storage; the choice still holds for this visit.
    }
  }

  function toggle(): void {
    choose(dark.value ? 'light' : 'dark')
  }

  return { choice, mode, dark, choose, toggle }
})
