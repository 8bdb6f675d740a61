import type { GlobalThemeOverrides } from 'naive-ui'
import type { ThemeMode } from '@/stores/theme'

/** One calm accent (a deep teal-blue), cool neutral greys, Inter, compact tables. */
const FONT = "'Inter', system-ui, -apple-system, 'Segoe UI', Roboto, sans-serif"
const MONO = "ui-monospace, 'SFMono-Regular', 'DejaVu Sans Mono', Menlo, Consolas, monospace"

const accent = {
  light: { base: '#1d6f8a', hover: '#26829f', pressed: '#155a70', suppl: '#26829f' },
  dark: { base: '#5aaecb', hover: '#76bfd8', pressed: '#3f93b0', suppl: '#76bfd8' },
}

const surfaces = {
  light: { body: '#f5f6f8', card: '#ffffff', modal: '#ffffff', popover: '#ffffff', border: '#e1e4e9', header: '#ffffff', sider: '#fbfbfc' },
  dark: { body: '#15181d', card: '#1c2027', modal: '#20252d', popover: '#232831', border: '#2d333c', header: '#1a1e24', sider: '#181b21' },
}

export function themeOverrides(mode: ThemeMode): GlobalThemeOverrides {
  const a = accent[mode]
  const s = surfaces[mode]
  return {
    common: {
      fontFamily: FONT,
      fontFamilyMono: MONO,
      fontSize: '14px',
      fontSizeMedium: '14px',
      fontSizeSmall: '13px',
      borderRadius: '6px',
      borderRadiusSmall: '4px',
      primaryColor: a.base,
      primaryColorHover: a.hover,
      primaryColorPressed: a.pressed,
      primaryColorSuppl: a.suppl,
      infoColor: a.base,
      infoColorHover: a.hover,
      infoColorPressed: a.pressed,
      infoColorSuppl: a.suppl,
      bodyColor: s.body,
      cardColor: s.card,
      modalColor: s.modal,
      popoverColor: s.popover,
      borderColor: s.border,
      dividerColor: s.border,
    },
    Layout: { color: s.body, headerColor: s.header, siderColor: s.sider, headerBorderColor: s.border, siderBorderColor: s.border },
    Menu: { itemHeight: '36px', borderRadius: '6px' },
    DataTable: { thFontWeight: '600', tdPaddingSmall: '7px 10px', thPaddingSmall: '7px 10px' },
    Card: { titleFontWeight: '600', borderColor: s.border },
    Button: { fontWeight: '500' },
    // Help under a field a little smaller than the field, and a little room before the next label.
    Form: { feedbackFontSizeMedium: '12.5px', feedbackFontSizeSmall: '12px', feedbackHeightMedium: '28px' },
  }
}

/** Colours the few hand-drawn pieces (logo, headings) use, so they match the naive-ui theme. */
export function brandColors(mode: ThemeMode): { accent: string; ink: string; muted: string; border: string; surface: string; warn: string } {
  return mode === 'dark'
    ? { accent: accent.dark.base, ink: '#e6e9ee', muted: '#98a1ad', border: surfaces.dark.border, surface: surfaces.dark.card, warn: '#e6a23c' }
    : { accent: accent.light.base, ink: '#1c2330', muted: '#5d6775', border: surfaces.light.border, surface: surfaces.light.card, warn: '#a86200' }
}
