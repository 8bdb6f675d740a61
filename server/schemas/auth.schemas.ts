import { z } from 'zod'
import { email, password } from './common'

export const loginBody = z.object({ email: z.string().trim().min(1, 'is required').max(254), password: z.string().min(1, 'is required').max(200) })
export const forgotBody = z.object({ email })
export const tokenQuery = z.object({ token: z.string().min(10).max(200) })
export const setPasswordBody = z.object({ token: z.string().min(10).max(200), password })
export const changePasswordBody = z.object({ currentPassword: z.string().min(1, 'is required').max(200), newPassword: password })
