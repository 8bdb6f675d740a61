import type { RouteRecordRaw } from 'vue-router'
import type { Role } from '@shared/roles'

declare module 'vue-router' {
  interface RouteMeta {
    /** Roles that may open the screen; absent means any signed-in person. */
    roles?: readonly Role[]
    /** Open to anonymous visitors (sign-in, set-password, not found). */
    public?: boolean
    /** Drawn without the app shell even when someone is signed in. */
    bare?: boolean
    /** Window title; "Lineweight" is appended. */
    title?: string
  }
}

/** Every screen's route name, so links and the nav table are checked by the compiler. */
export type AppRouteName =
  | 'home'
  | 'signIn'
  | 'setPassword'
  | 'account'
  | 'people'
  | 'outbox'
  | 'notFound'
  | 'submit'
  | 'spectra'
  | 'spectrum'
  | 'reviewQueue'
  | 'spectrumReview'
  | 'disputes'
  | 'campaigns'
  | 'standards'
  | 'audit'
  | 'releases'
  | 'release'
  | 'apiReference'

type AppRoute = RouteRecordRaw & { name: AppRouteName }

/** Named, lazily loaded screens. Who may open each one is stated here, once; the nav table reads it. */
export const routes: AppRoute[] = [
  // Redirected by the guard to the signed-in person's home (see HOME_ROUTE in nav.ts).
  { path: '/', name: 'home', component: () => import('@/views/HomeRedirectView.vue') },
  { path: '/sign-in', name: 'signIn', component: () => import('@/views/SignInView.vue'), meta: { public: true, bare: true, title: 'Sign in' } },
  { path: '/set-password', name: 'setPassword', component: () => import('@/views/SetPasswordView.vue'), meta: { public: true, bare: true, title: 'Set password' } },
  { path: '/account', name: 'account', component: () => import('@/views/AccountView.vue'), meta: { title: 'My account' } },
  { path: '/people', name: 'people', component: () => import('@/views/PeopleView.vue'), meta: { roles: ['lead'], title: 'People' } },
  { path: '/outbox', name: 'outbox', component: () => import('@/views/OutboxView.vue'), meta: { roles: ['lead'], title: 'Outbox' } },
  { path: '/submit', name: 'submit', component: () => import('@/views/SubmitView.vue'), meta: { roles: ['observer', 'lead'], title: 'Submit' } },
  { path: '/spectra', name: 'spectra', component: () => import('@/views/MySpectraView.vue'), meta: { title: 'My spectra' } },
  { path: '/spectra/:id(\\d+)', name: 'spectrum', component: () => import('@/views/SpectrumView.vue'), meta: { title: 'Spectrum' } },
  { path: '/review', name: 'reviewQueue', component: () => import('@/views/ReviewQueueView.vue'), meta: { roles: ['classifier', 'lead'], title: 'Review queue' } },
  { path: '/review/:id(\\d+)', name: 'spectrumReview', component: () => import('@/views/SpectrumReviewView.vue'), meta: { roles: ['classifier', 'lead'], title: 'Spectrum review' } },
  { path: '/disputes', name: 'disputes', component: () => import('@/views/DisputesView.vue'), meta: { roles: ['lead'], title: 'Disputes' } },
  { path: '/campaigns', name: 'campaigns', component: () => import('@/views/CampaignsView.vue'), meta: { roles: ['lead'], title: 'Campaigns' } },
  { path: '/standards', name: 'standards', component: () => import('@/views/StandardsView.vue'), meta: { roles: ['classifier', 'lead'], title: 'Standards library' } },
  { path: '/audit', name: 'audit', component: () => import('@/views/AuditView.vue'), meta: { roles: ['lead'], title: 'Agreement audit' } },
  { path: '/releases', name: 'releases', component: () => import('@/views/ReleasesView.vue'), meta: { title: 'Catalogue releases' } },
  { path: '/releases/:id(\\d+)', name: 'release', component: () => import('@/views/ReleasesView.vue'), meta: { title: 'Catalogue release' } },
  { path: '/api-reference', name: 'apiReference', component: () => import('@/views/ApiReferenceView.vue'), meta: { title: 'API reference' } },
  { path: '/:pathMatch(.*)*', name: 'notFound', component: () => import('@/views/NotFoundView.vue'), meta: { public: true, title: 'Not found' } },
]

/** Whether a role may open the named route, from the route's own meta. */
export function roleMayOpen(name: AppRouteName, role: Role): boolean {
  const route = routes.find((r) => r.name === name)
  const roles = route?.meta?.roles
  return route !== undefined && (roles === undefined || roles.includes(role))
}
