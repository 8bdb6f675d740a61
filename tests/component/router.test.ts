import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory } from 'vue-router'
import type { PublicUser } from '@/api/types'

const fetchMe = vi.fn<() => Promise<PublicUser | null>>()
vi.mock('@/api/auth', () => ({ fetchMe: () => fetchMe(), signIn: vi.fn(), signOut: vi.fn() }))
const warning = vi.fn()
vi.mock('@/lib/discrete', () => ({ notify: { warning: (t: string) => warning(t), info: vi.fn(), error: vi.fn(), success: vi.fn() } }))

// The screens themselves are not under test here; stand-ins keep the run fast.
const stub = vi.hoisted(() => () => ({ default: { render: () => null } }))
vi.mock('@/views/AccountView.vue', stub)
vi.mock('@/views/AuditView.vue', stub)
vi.mock('@/views/CampaignsView.vue', stub)
vi.mock('@/views/DisputesView.vue', stub)
vi.mock('@/views/HomeRedirectView.vue', stub)
vi.mock('@/views/MySpectraView.vue', stub)
vi.mock('@/views/NotFoundView.vue', stub)
vi.mock('@/views/OutboxView.vue', stub)
vi.mock('@/views/PeopleView.vue', stub)
vi.mock('@/views/ReleasesView.vue', stub)
vi.mock('@/views/ReviewQueueView.vue', stub)
vi.mock('@/views/SetPasswordView.vue', stub)
vi.mock('@/views/SignInView.vue', stub)
vi.mock('@/views/SpectrumReviewView.vue', stub)
vi.mock('@/views/SpectrumView.vue', stub)
vi.mock('@/views/StandardsView.vue', stub)
vi.mock('@/views/SubmitView.vue', stub)

const { createAppRouter, safeNext } = await import('@/router')
const { HOME_ROUTE } = await import('@/router/nav')

const person = (role: PublicUser['role']): PublicUser => ({
  id: 7,
  email: `${role}@kestrel-ridge.example`,
  name: 'Ilse Varga',
  role,
  active: true,
  invited: false,
  lastLoginAt: null,
  createdAt: '2026-01-05T10:00:00.000Z',
})

async function open(path: string) {
  const router = createAppRouter(createMemoryHistory())
  await router.push(path)
  return router.currentRoute.value
}

beforeEach(() => {
  setActivePinia(createPinia())
  fetchMe.mockReset()
  warning.mockReset()
})

describe('the router guard', () => {
  it('sends an anonymous visitor to sign-in and remembers where they were going', async () => {
    fetchMe.mockResolvedValue(null)
    const here = await open('/people?tab=2')
    expect(here.name).toBe('signIn')
    expect(here.query.next).toBe('/people?tab=2')
  })

  it('asks the server who is signed in only once', async () => {
    fetchMe.mockResolvedValue(person('lead'))
    const router = createAppRouter(createMemoryHistory())
    await router.push('/people')
    await router.push('/outbox')
    await router.push('/account')
    expect(fetchMe).toHaveBeenCalledTimes(1)
  })

  it('lets anyone open the set-password and not-found screens', async () => {
    fetchMe.mockResolvedValue(null)
    expect((await open('/set-password?token=abc')).name).toBe('setPassword')
    expect((await open('/no/such/screen')).name).toBe('notFound')
  })

  it('sends a person of the wrong role to their home with a message', async () => {
    fetchMe.mockResolvedValue(person('observer'))
    const here = await open('/outbox')
    expect(here.name).toBe(HOME_ROUTE.observer)
    expect(warning).toHaveBeenCalledWith(expect.stringContaining('Outbox is for leads only'))
  })

  it('sends "/" and the sign-in screen to the signed-in person’s home', async () => {
    fetchMe.mockResolvedValue(person('lead'))
    expect((await open('/')).name).toBe(HOME_ROUTE.lead)
    expect((await open('/sign-in')).name).toBe(HOME_ROUTE.lead)
  })

  it('follows only in-app paths in ?next=', () => {
    expect(safeNext('/outbox')).toBe('/outbox')
    expect(safeNext('//elsewhere.example')).toBeNull()
    expect(safeNext('https://elsewhere.example')).toBeNull()
    expect(safeNext(undefined)).toBeNull()
  })
})
