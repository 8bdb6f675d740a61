import { z } from 'zod'
import { email, personName, role } from './common'

export const inviteBody = z.object({ email, name: personName, role })
export const updateUserBody = z
  .object({ role: role.optional(), active: z.boolean().optional(), name: personName.optional() })
  .refine((v) => Object.keys(v).length > 0, 'nothing to change')
