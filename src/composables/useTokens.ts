import type { ApiTokenView } from '@/api/tokens'
import { useAsync } from './useAsync'

/** A list of API tokens with `replace`, to keep it in step after a revocation or a new token. */
export function useTokens(loader: () => Promise<ApiTokenView[]>) {
  const tokens = useAsync(loader)

  function replace(token: ApiTokenView): void {
    const list = tokens.data.value ?? []
    tokens.data.value = list.some((t) => t.id === token.id) ? list.map((t) => (t.id === token.id ? token : t)) : [token, ...list]
  }

  return { ...tokens, replace }
}
