import { usersApi, type InviteInput, type UserChanges } from '@shared/api/users'
import { call } from './http'

export type { InviteInput, UserChanges }

export const listUsers = async () => (await call(usersApi.list)).users

export const inviteUser = async (input: InviteInput) => (await call(usersApi.invite, { body: input })).user

export const updateUser = async (id: number, changes: UserChanges) => (await call(usersApi.update, { params: { id }, body: changes })).user

export const resendInvitation = (id: number) => call(usersApi.resendInvitation, { params: { id } })
