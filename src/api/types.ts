import type { Role } from '@shared/roles'

/** A person as the API shows them (server: toPublicUser). */
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

export interface MessageReply {
  message: string
}
