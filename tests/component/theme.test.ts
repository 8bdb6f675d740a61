import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { useThemeStore } from '@/stores/theme'

function osPrefersDark(dark: boolean) {
  vi.stubGlobal('matchMedia', (query: string) => ({ matches: dark, media: query, addEventListener: () => undefined, removeEventListener: () => undefined }))
}

beforeEach(() => {
  localStorage.clear()
  setActivePinia(createPinia())
})
afterEach(() => vi.unstubAllGlobals())

describe('the theme store', () => {
  it('follows the operating system until a theme is chosen', () => {
    osPrefersDark(true)
    const theme = useThemeStore()
    expect(theme.choice).toBe('system')
    expect(theme.mode).toBe('dark')
  })

  it('remembers a chosen theme in localStorage across page loads', () => {
    osPrefersDark(false)
    useThemeStore().toggle()
    expect(localStorage.getItem('lineweight.theme')).toBe('dark')
    setActivePinia(createPinia())
    expect(useThemeStore().mode).toBe('dark')
  })
})
