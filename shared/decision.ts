import type { Agreement, ClassificationSource } from './api/review'

/** How a decision came about, in the words of the screens and the catalogue. One call is a single call, not a consensus. */
export function decisionLabel(c: { source: ClassificationSource; nCalls: number }): string {
  if (c.source === 'settled') return 'settled by lead'
  if (c.nCalls <= 1) return c.source === 'accepted-suggestion' ? 'single call (suggestion accepted)' : 'single call'
  if (c.source === 'accepted-suggestion') return `accepted suggestion (${c.nCalls} calls)`
  return `consensus of ${c.nCalls}`
}

/** How the calls agreed; a single call has nothing to agree with, so it says so instead of "exact". */
export function agreementLabel(c: { agreement: Agreement; nCalls: number }): 'exact' | 'within' | 'settled' | 'single' {
  if (c.agreement === 'settled') return 'settled'
  return c.nCalls <= 1 ? 'single' : c.agreement
}
