import { authApi, type TokenInfo, type TokenPurpose } from '@shared/api/auth'
import type { PublicUser } from '@shared/api/users'
import { call, setCsrfToken } from './http'

export type { TokenInfo, TokenPurpose }

/** Signs in and adopts the new session's CSRF token (the session id changes on sign-in). */
export async function signIn(email: string, password: string): Promise<PublicUser> {
  const reply = await call(authApi.login, { body: { email, password } })
  setCsrfToken(reply.csrfToken)
  return reply.user
}

export async function signOut(): Promise<void> {
  const reply = await call(authApi.logout)
  setCsrfToken(reply.csrfToken)
}

/** The signed-in person, or null when nobody is signed in. */
export async function fetchMe(): Promise<PublicUser | null> {
  try {
    return (await call(authApi.me, {}, { quiet: true })).user
  } catch (error) {
    if ((error as { status?: number }).status === 401) return null
    throw error
  }
}

export const changePassword = (currentPassword: string, newPassword: string) => call(authApi.changePassword, { body: { currentPassword, newPassword } })

/** Always answers with the same neutral message, whether or not the address has an account. */
export const requestPasswordReset = (email: string) => call(authApi.forgot, { body: { email } })

export const describeToken = (token: string) => call(authApi.describeLink, { query: { token } }, { quiet: true })

export const setPasswordWithToken = (token: string, password: string) => call(authApi.setPassword, { body: { token, password } })
