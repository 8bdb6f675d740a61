import { createDiscreteApi, darkTheme, type ConfigProviderProps, type DiscreteApi } from 'naive-ui'
import { getActivePinia } from 'pinia'
import { computed } from 'vue'
import { useThemeStore } from '@/stores/theme'
import { themeOverrides } from '@/theme/overrides'

// Messages from outside components (router guard, http handlers). Components use useMessage() from App.vue's providers.
let api: Pick<DiscreteApi, 'message'> | null = null

function discrete(): Pick<DiscreteApi, 'message'> {
  if (!api) {
    const configProviderProps = computed<ConfigProviderProps>(() => {
      const mode = getActivePinia() ? useThemeStore().mode : 'light'
      return { theme: mode === 'dark' ? darkTheme : null, themeOverrides: themeOverrides(mode) }
    })
    api = createDiscreteApi(['message'], { configProviderProps })
  }
  return api
}

const lastShown = new Map<string, number>()

/** Shows a short message; the same text is not repeated within a few seconds (several failing calls, one message). */
function show(kind: 'info' | 'warning' | 'error' | 'success', text: string): void {
  const now = Date.now()
  if ((lastShown.get(text) ?? 0) > now - 4000) return
  lastShown.set(text, now)
  discrete().message[kind](text, { duration: 5000, closable: true })
}

export const notify = {
  info: (text: string) => show('info', text),
  success: (text: string) => show('success', text),
  warning: (text: string) => show('warning', text),
  error: (text: string) => show('error', text),
}
