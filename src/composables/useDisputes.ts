import { listDisputes } from '@/api/disputes'
import { useAsync } from './useAsync'

/** Open (and recently settled) disputes for the Disputes screen. */
export function useDisputes() {
  return useAsync(listDisputes)
}
