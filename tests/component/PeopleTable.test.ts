import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import type { PublicUser } from '@/api/types'
import PeopleTable from '@/components/PeopleTable.vue'

const base = { lastLoginAt: null, createdAt: '2026-01-05T10:00:00.000Z' }
const users: PublicUser[] = [
  { ...base, id: 1, email: 'lead@kestrel-ridge.example', name: 'Maren Olukoya', role: 'lead', active: true, invited: false, lastLoginAt: '2026-03-01T20:00:00.000Z' },
  { ...base, id: 2, email: 'new@kestrel-ridge.example', name: 'Tomas Reyes', role: 'observer', active: true, invited: true },
  { ...base, id: 3, email: 'gone@kestrel-ridge.example', name: 'Anouk Berg', role: 'classifier', active: false, invited: false },
]

function rowOf(wrapper: ReturnType<typeof mount>, email: string) {
  return wrapper.get(`[data-testid="people-row"][data-email="${email}"]`)
}

describe('PeopleTable', () => {
  const wrapper = mount(PeopleTable, { props: { users, currentUserId: 1, busyIds: new Set<number>() } })

  it('draws one row per person with their status', () => {
    expect(wrapper.findAll('[data-testid="people-row"]')).toHaveLength(3)
    expect(rowOf(wrapper, 'lead@kestrel-ridge.example').get('[data-testid="people-status"]').text()).toBe('Active')
    expect(rowOf(wrapper, 'new@kestrel-ridge.example').get('[data-testid="people-status"]').text()).toBe('Invited')
    expect(rowOf(wrapper, 'gone@kestrel-ridge.example').get('[data-testid="people-status"]').text()).toBe('Deactivated')
  })

  it('offers a resend only for invited people, and no deactivate on one’s own row', () => {
    expect(rowOf(wrapper, 'new@kestrel-ridge.example').find('[data-testid="people-resend"]').exists()).toBe(true)
    expect(rowOf(wrapper, 'gone@kestrel-ridge.example').find('[data-testid="people-resend"]').exists()).toBe(false)
    expect(rowOf(wrapper, 'lead@kestrel-ridge.example').find('[data-testid="people-deactivate"]').exists()).toBe(false)
    expect(rowOf(wrapper, 'gone@kestrel-ridge.example').find('[data-testid="people-reactivate"]').exists()).toBe(true)
  })

  it('asks the screen to deactivate or resend, with the person', async () => {
    await rowOf(wrapper, 'new@kestrel-ridge.example').get('[data-testid="people-deactivate"]').trigger('click')
    await rowOf(wrapper, 'new@kestrel-ridge.example').get('[data-testid="people-resend"]').trigger('click')
    expect(wrapper.emitted('setActive')?.[0]).toEqual([users[1], false])
    expect(wrapper.emitted('resendInvitation')?.[0]).toEqual([users[1]])
  })
})
