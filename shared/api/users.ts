import type { Role } from '../roles'

/** A person as the API shows them. */
export interface PublicUser {
  id: number
  email: string
  name: string
  role: Role
  active: boolean
  /** Invited and not yet set a password. */
  invited: boolean
  lastLoginAt: string | null
  createdAt: string
}

export interface InviteInput {
  email: string
  name: string
  role: Role
}

export interface UserChanges {
  role?: Role
  active?: boolean
  name?: string
}
