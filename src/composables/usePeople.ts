import { listUsers } from '@/api/users'
import type { PublicUser } from '@/api/types'
import { useAsync } from './useAsync'

/** The team's people for the People screen; `replace` keeps the list in step after a change. */
export function usePeople() {
  const people = useAsync(listUsers)

  function replace(user: PublicUser): void {
    const list = people.data.value ?? []
    const found = list.some((u) => u.id === user.id)
    const next = found ? list.map((u) => (u.id === user.id ? user : u)) : [...list, user]
    people.data.value = next.sort((a, b) => a.name.localeCompare(b.name))
  }

  return { ...people, replace }
}
