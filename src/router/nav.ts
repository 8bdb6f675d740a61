import type { Role } from '@shared/roles'
import { roleMayOpen, type AppRouteName } from './routes'

export type NavIconName = 'people' | 'mail' | 'account' | 'upload' | 'spectra' | 'queue' | 'dispute' | 'campaign' | 'standards' | 'audit' | 'release' | 'api'

export interface NavEntry {
  route: AppRouteName
  label: string
  icon: NavIconName
  /** Screens reached from this one (detail pages) that keep its entry highlighted. */
  covers?: readonly AppRouteName[]
}

/**
 * The left navigation, top to bottom. Adding a screen to it is one line here; who sees the entry
 * follows the route's `meta.roles` in routes.ts, so the nav never offers a screen the router refuses.
 */
export const NAV_ENTRIES: readonly NavEntry[] = [
  { route: 'submit', label: 'Submit', icon: 'upload' },
  { route: 'spectra', label: 'My spectra', icon: 'spectra', covers: ['spectrum'] },
  { route: 'reviewQueue', label: 'Review queue', icon: 'queue', covers: ['spectrumReview'] },
  { route: 'disputes', label: 'Disputes', icon: 'dispute' },
  { route: 'campaigns', label: 'Campaigns', icon: 'campaign' },
  { route: 'standards', label: 'Standards library', icon: 'standards' },
  { route: 'audit', label: 'Agreement audit', icon: 'audit' },
  { route: 'releases', label: 'Catalogue releases', icon: 'release', covers: ['release'] },
  { route: 'people', label: 'People', icon: 'people' },
  { route: 'outbox', label: 'Outbox', icon: 'mail' },
  { route: 'account', label: 'My account', icon: 'account' },
  { route: 'apiReference', label: 'API reference', icon: 'api' },
]

/** Where each role lands after signing in, and when it opens a screen it may not see. */
export const HOME_ROUTE: Record<Role, AppRouteName> = {
  observer: 'spectra',
  classifier: 'reviewQueue',
  lead: 'disputes',
}

/** The nav entry to highlight on a screen: its own, or the one whose detail page it is. */
export function navEntryFor(routeName: string | null): AppRouteName | null {
  if (!routeName) return null
  const entry = NAV_ENTRIES.find((e) => e.route === routeName || e.covers?.includes(routeName as AppRouteName))
  return entry?.route ?? null
}

export function navFor(role: Role): NavEntry[] {
  return NAV_ENTRIES.filter((entry) => roleMayOpen(entry.route, role))
}
