import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ROLES, type Role } from '@shared/roles'
import AppShellNav from '@/components/AppShellNav.vue'
import { HOME_ROUTE, NAV_ENTRIES, navEntryFor, navFor } from '@/router/nav'
import { roleMayOpen, routes } from '@/router/routes'

async function navTestIds(role: Role): Promise<string[]> {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push('/account')
  const wrapper = mount(AppShellNav, { props: { role }, global: { plugins: [router] } })
  return wrapper.findAll('[data-testid^="nav-"]').map((a) => a.attributes('data-testid') ?? '')
}

describe('AppShellNav', () => {
  it('shows a lead every screen, in the order of the nav table', async () => {
    expect(await navTestIds('lead')).toEqual(NAV_ENTRIES.map((e) => `nav-${e.route}`))
  })

  it('shows observers and classifiers only the screens of their role', async () => {
    expect(await navTestIds('observer')).toEqual(['nav-submit', 'nav-spectra', 'nav-releases', 'nav-account', 'nav-apiReference'])
    expect(await navTestIds('classifier')).toEqual(['nav-spectra', 'nav-reviewQueue', 'nav-standards', 'nav-releases', 'nav-account', 'nav-apiReference'])
  })

  it('links each entry to its route', async () => {
    const router = createRouter({ history: createMemoryHistory(), routes })
    await router.push('/account')
    const wrapper = mount(AppShellNav, { props: { role: 'lead' }, global: { plugins: [router] } })
    expect(wrapper.get('[data-testid="nav-outbox"]').attributes('href')).toBe('/outbox')
  })
})

describe('the nav table', () => {
  it('offers every role only screens its router lets it open', () => {
    for (const role of ROLES) for (const entry of navFor(role)) expect(roleMayOpen(entry.route, role)).toBe(true)
  })

  it('keeps the list entry highlighted on its detail pages', () => {
    expect(navEntryFor('spectrum')).toBe('spectra')
    expect(navEntryFor('release')).toBe('releases')
    expect(navEntryFor('spectrumReview')).toBe('reviewQueue')
    expect(navEntryFor('people')).toBe('people')
    expect(navEntryFor('notFound')).toBeNull()
  })

  it('names only routes that exist, and gives every role a home it may open', () => {
    const names = new Set(routes.map((r) => r.name))
    for (const entry of NAV_ENTRIES) expect(names.has(entry.route)).toBe(true)
    for (const role of ROLES) expect(roleMayOpen(HOME_ROUTE[role], role)).toBe(true)
  })
})
