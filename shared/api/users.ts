import { z } from 'zod'
import { ROLES } from '../roles'
import { email, idParams, personName, role } from './common'
import { MessageReply, endpoint } from './endpoint'

/** A person as the API shows them. */
export const PublicUser = z
  .object({
    id: z.number().int(),
    email: z.string(),
    name: z.string(),
    role: z.enum(ROLES),
    active: z.boolean(),
    /** Invited and not yet set a password. */
    invited: z.boolean(),
    lastLoginAt: z.string().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'PublicUser' })
export type PublicUser = z.infer<typeof PublicUser>

export const InviteInput = z.object({ email, name: personName, role })
export type InviteInput = z.input<typeof InviteInput>

export const UserChanges = z.object({ role: role.optional(), active: z.boolean().optional(), name: personName.optional() }).refine((v) => Object.keys(v).length > 0, 'nothing to change')
export type UserChanges = z.infer<typeof UserChanges>

const userReply = z.object({ user: PublicUser })

export const usersApi = {
  list: endpoint({ method: 'get', path: '/users', tag: 'People', summary: 'Everyone with an account', response: z.object({ users: z.array(PublicUser) }) }),
  invite: endpoint({ method: 'post', path: '/users', tag: 'People', summary: 'Invite a person (mails a link to set a password)', body: InviteInput, status: 201, response: userReply }),
  update: endpoint({
    method: 'patch',
    path: '/users/:id',
    tag: 'People',
    summary: "Change a person's role, name or whether the account is active",
    params: idParams,
    body: UserChanges,
    response: userReply,
  }),
  resendInvitation: endpoint({ method: 'post', path: '/users/:id/invitation', tag: 'People', summary: 'Send the invitation again', params: idParams, status: 202, response: MessageReply }),
}
