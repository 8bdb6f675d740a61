import type { AppContext } from '../context'
import { currentUser } from '../middleware/auth'
import { idParams } from '../schemas/common'
import { inviteBody, updateUserBody } from '../schemas/users.schemas'
import { inviteUser, listUsers, resendInvitation, updateUser } from '../services/users.service'
import { LEAD, defineRoutes } from './route'

export function userRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/users',
      access: LEAD,
      handler: async (_req, res) => {
        res.json({ users: await listUsers() })
      },
    },
    {
      method: 'post',
      path: '/users',
      access: LEAD,
      schema: { body: inviteBody },
      handler: async (req, res) => {
        res.status(201).json({ user: await inviteUser(ctx, res.locals.body, currentUser(req)) })
      },
    },
    {
      method: 'patch',
      path: '/users/:id',
      access: LEAD,
      schema: { params: idParams, body: updateUserBody },
      handler: async (req, res) => {
        res.json({ user: await updateUser(ctx, res.locals.params.id, res.locals.body, currentUser(req)) })
      },
    },
    {
      method: 'post',
      path: '/users/:id/invitation',
      access: LEAD,
      schema: { params: idParams },
      handler: async (req, res) => {
        await resendInvitation(ctx, res.locals.params.id, currentUser(req))
        res.status(202).json({ message: 'A new invitation has been sent.' })
      },
    },
  ])
}
