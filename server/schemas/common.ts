import { z } from 'zod'
import { ROLES } from '../../shared/roles'

export const idParams = z.object({ id: z.coerce.number().int().positive() })
export const email = z.string().trim().toLowerCase().email('is not an e-mail address').max(254)
export const role = z.enum(ROLES)
export const password = z.string().min(10, 'must be at least 10 characters').max(200, 'must be at most 200 characters')
export const personName = z.string().trim().min(1, 'is required').max(120)
