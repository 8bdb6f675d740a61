import { http, setCsrfToken } from './http'
import type { MessageReply, PublicUser } from './types'

export type TokenPurpose = 'invite' | 'reset'

export interface TokenInfo {
  purpose: TokenPurpose
  email: string
  name: string
}

/** Signs in and adopts the new session's CSRF token (the session id changes on sign-in). */
export async function signIn(email: string, password: string): Promise<PublicUser> {
  const reply = await http.post<{ user: PublicUser; csrfToken: string }>('/auth/login', { email, password })
  setCsrfToken(reply.csrfToken)
  return reply.user
}

export async function signOut(): Promise<void> {
  const reply = await http.post<{ csrfToken: string }>('/auth/logout')
  setCsrfToken(reply.csrfToken)
}

/** The signed-in person, or null when nobody is signed in. */
export async function fetchMe(): Promise<PublicUser | null> {
  try {
    const reply = await http.get<{ user: PublicUser }>('/me', { quiet: true })
    return reply.user
  } catch (error) {
    if ((error as { status?: number }).status === 401) return null
    throw error
  }
}

export const changePassword = (currentPassword: string, newPassword: string) =>
  http.post<MessageReply>('/me/password', { currentPassword, newPassword })

/** Always answers with the same neutral message, whether or not the address has an account. */
export const requestPasswordReset = (email: string) => http.post<MessageReply>('/auth/forgot', { email })

export const describeToken = (token: string) => http.get<TokenInfo>('/auth/token', { query: { token }, quiet: true })

export const setPasswordWithToken = (token: string, password: string) =>
  http.post<MessageReply>('/auth/set-password', { token, password })
