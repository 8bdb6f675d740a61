import { z } from 'zod'
import { email, password } from './common'
import { MessageReply, endpoint } from './endpoint'
import { PublicUser } from './users'

export const LoginInput = z.object({ email: z.string().trim().min(1, 'is required').max(254), password: z.string().min(1, 'is required').max(200) })
const linkToken = z.string().min(10).max(200)

/** What an invitation or reset link is for. */
export const TokenInfo = z.object({ purpose: z.enum(['invite', 'reset']), email: z.string(), name: z.string() }).meta({ id: 'LinkTokenInfo' })
export type TokenInfo = z.infer<typeof TokenInfo>
export type TokenPurpose = TokenInfo['purpose']

const csrfReply = z.object({ csrfToken: z.string() })

export const authApi = {
  csrf: endpoint({
    method: 'get',
    path: '/auth/csrf',
    tag: 'Accounts',
    summary: "The session's CSRF token, sent back as x-csrf-token on every state-changing request of a cookie session",
    response: csrfReply,
  }),
  login: endpoint({
    method: 'post',
    path: '/auth/login',
    tag: 'Accounts',
    summary: 'Sign in (starts a cookie session)',
    body: LoginInput,
    response: z.object({ user: PublicUser, csrfToken: z.string() }),
  }),
  logout: endpoint({ method: 'post', path: '/auth/logout', tag: 'Accounts', summary: 'Sign out', response: csrfReply }),
  forgot: endpoint({
    method: 'post',
    path: '/auth/forgot',
    tag: 'Accounts',
    summary: 'Ask for a password-reset link (the same answer whether or not the address has an account)',
    body: z.object({ email }),
    status: 202,
    response: MessageReply,
  }),
  describeLink: endpoint({ method: 'get', path: '/auth/token', tag: 'Accounts', summary: 'What an invitation or reset link is for', query: z.object({ token: linkToken }), response: TokenInfo }),
  setPassword: endpoint({
    method: 'post',
    path: '/auth/set-password',
    tag: 'Accounts',
    summary: 'Set a password with an invitation or reset link',
    body: z.object({ token: linkToken, password }),
    response: MessageReply,
  }),
  me: endpoint({ method: 'get', path: '/me', tag: 'Accounts', summary: 'The signed-in person', response: z.object({ user: PublicUser }) }),
  changePassword: endpoint({
    method: 'post',
    path: '/me/password',
    tag: 'Accounts',
    summary: 'Change one’s own password (signs out the other sessions)',
    body: z.object({ currentPassword: z.string().min(1, 'is required').max(200), newPassword: password }),
    response: MessageReply,
  }),
}
