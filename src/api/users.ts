import type { InviteInput, UserChanges } from '@shared/api/users'
import { http } from './http'
import type { MessageReply, PublicUser } from './types'

export type { InviteInput, UserChanges }

export const listUsers = async (): Promise<PublicUser[]> => (await http.get<{ users: PublicUser[] }>('/users')).users

export const inviteUser = async (input: InviteInput): Promise<PublicUser> =>
  (await http.post<{ user: PublicUser }>('/users', input)).user

export const updateUser = async (id: number, changes: UserChanges): Promise<PublicUser> =>
  (await http.patch<{ user: PublicUser }>(`/users/${id}`, changes)).user

export const resendInvitation = (id: number) => http.post<MessageReply>(`/users/${id}/invitation`)
