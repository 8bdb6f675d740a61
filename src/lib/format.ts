const dateTime = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short' })

/** "12 Mar 2026, 21:40" in the viewer's time zone, or a dash for never. */
export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '—'
  const d = new Date(iso)
  return Number.isNaN(d.getTime()) ? '—' : dateTime.format(d)
}

/** "3 minutes ago", "yesterday", … for recent times; the date for older ones. */
export function formatRelative(iso: string | null | undefined, now: Date = new Date()): string {
  if (!iso) return 'never'
  const d = new Date(iso)
  const seconds = (d.getTime() - now.getTime()) / 1000
  const rtf = new Intl.RelativeTimeFormat('en', { numeric: 'auto' })
  const abs = Math.abs(seconds)
  if (abs < 60) return 'just now'
  if (abs < 3600) return rtf.format(Math.round(seconds / 60), 'minute')
  if (abs < 86400) return rtf.format(Math.round(seconds / 3600), 'hour')
  if (abs < 7 * 86400) return rtf.format(Math.round(seconds / 86400), 'day')
  return formatDateTime(iso)
}

const clock = new Intl.DateTimeFormat('en-GB', { timeStyle: 'short' })

/** "21:40" for a time today in the viewer's zone, else the full date and time. */
export function formatClock(iso: string | null | undefined, now: Date = new Date()): string {
  if (!iso) return '—'
  const d = new Date(iso)
  if (Number.isNaN(d.getTime())) return '—'
  return d.toDateString() === now.toDateString() ? clock.format(d) : formatDateTime(iso)
}
