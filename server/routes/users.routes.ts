import { usersApi } from '../../shared/api/users'
import type { AppContext } from '../context'
import { inviteUser, listUsers, resendInvitation, updateUser } from '../services/users.service'
import { LEAD, route } from './route'

export function userRoutes(ctx: AppContext) {
  return [
    route(usersApi.list, { access: LEAD, handler: async () => ({ users: await listUsers() }) }),
    route(usersApi.invite, { access: LEAD, handler: async ({ body, user }) => ({ user: await inviteUser(ctx, body, user) }) }),
    route(usersApi.update, { access: LEAD, handler: async ({ params, body, user }) => ({ user: await updateUser(ctx, params.id, body, user) }) }),
    route(usersApi.resendInvitation, {
      access: LEAD,
      handler: async ({ params, user }) => {
        await resendInvitation(ctx, params.id, user)
        return { message: 'A new invitation has been sent.' }
      },
    }),
  ]
}
