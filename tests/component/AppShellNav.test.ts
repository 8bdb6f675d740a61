import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ROLES, type Role } from '@shared/roles'
import AppShellNav from '@/components/AppShellNav.vue'
import { HOME_ROUTE, NAV_ENTRIES, navFor } from '@/router/nav'
import { roleMayOpen, routes } from '@/router/routes'

async function navTestIds(role: Role): Promise<string[]> {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push('/account')
  const wrapper = mount(AppShellNav, { props: { role }, global: { plugins: [router] } })
  return wrapper.findAll('[data-testid^="nav-"]').map((a) => a.attributes('data-testid') ?? '')
}

describe('AppShellNav', () => {
  it('shows a lead People, Outbox and My account', async () => {
    expect(await navTestIds('lead')).toEqual(['nav-people', 'nav-outbox', 'nav-account'])
  })

  it('shows observers and classifiers only My account', async () => {
    expect(await navTestIds('observer')).toEqual(['nav-account'])
    expect(await navTestIds('classifier')).toEqual(['nav-account'])
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

  it('names only routes that exist, and gives every role a home it may open', () => {
    const names = new Set(routes.map((r) => r.name))
    for (const entry of NAV_ENTRIES) expect(names.has(entry.route)).toBe(true)
    for (const role of ROLES) expect(roleMayOpen(HOME_ROUTE[role], role)).toBe(true)
  })
})
