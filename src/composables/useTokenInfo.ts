import { describeToken, type TokenInfo } from '@/api/auth'
import { ApiError } from '@/api/http'
import { useAsync } from './useAsync'

/** Who an invitation or reset link is for; a missing token reads as an expired link. */
export function useTokenInfo(token: string | null) {
  return useAsync<TokenInfo>(() =>
    token && token.length >= 10 ? describeToken(token) : Promise.reject(new ApiError(410, 'link_expired', 'This link is incomplete. Open it again from the mail, or ask for a new one.')),
  )
}
