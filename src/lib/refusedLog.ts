/**
 * The Submit screen's log of refused files: what was refused, when and why, kept in this browser's
 * storage per person so the reasons outlive the page. Newest first, at most LOG_LIMIT entries.
 */

export interface RefusedEntry {
  at: string
  file: string
  /** 'refused' by the reader, or 'not sent' when the upload itself failed. */
  kind: 'refused' | 'not sent'
  code: string
  message: string
  campaignId: number | null
}

export const LOG_LIMIT = 300
const key = (userId: number) => `lineweight.refused.${userId}`

export function readRefusedLog(userId: number): RefusedEntry[] {
  try {
    const raw = typeof localStorage === 'undefined' ? null : localStorage.getItem(key(userId))
    const list = raw ? (JSON.parse(raw) as unknown) : []
    return Array.isArray(list) ? (list.filter((e) => e && typeof e === 'object' && typeof (e as RefusedEntry).file === 'string') as RefusedEntry[]) : []
  } catch {
    return []
  }
}

export function appendRefused(userId: number, entries: RefusedEntry[]): RefusedEntry[] {
  const next = [...entries, ...readRefusedLog(userId)].slice(0, LOG_LIMIT)
  try {
    localStorage.setItem(key(userId), JSON.stringify(next))
  } catch {
    // no storage (private mode): the log lasts as long as the page
  }
  return next
}

export function clearRefusedLog(userId: number): void {
  try {
    localStorage.removeItem(key(userId))
  } catch {
    // nothing stored
  }
}
