import { createRouter, createWebHistory, type RouteLocationNormalized, type RouteLocationRaw, type Router, type RouterHistory } from 'vue-router'
import { ROLE_LABELS } from '@shared/roles'
import { notify } from '@/lib/discrete'
import { useSessionStore } from '@/stores/session'
import { HOME_ROUTE } from './nav'
import { routes } from './routes'

/** A `next` query value is only followed when it is a path inside this app. */
export function safeNext(value: unknown): string | null {
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') ? value : null
}

async function guard(to: RouteLocationNormalized): Promise<RouteLocationRaw | true> {
  const session = useSessionStore()
  let user = session.user
  try {
    user = await session.ensureLoaded()
  } catch {
    // The server is unreachable; public screens still open, the rest go to sign-in, which says why.
  }

  if (to.name === 'signIn' && user) return safeNext(to.query.next) ?? { name: HOME_ROUTE[user.role] }
  if (to.meta.public) return true
  if (!user) return { name: 'signIn', query: to.fullPath === '/' ? {} : { next: to.fullPath } }
  if (to.name === 'home') return { name: HOME_ROUTE[user.role] }
  if (to.meta.roles && !to.meta.roles.includes(user.role)) {
    const who = to.meta.roles.map((r) => `${ROLE_LABELS[r].toLowerCase()}s`).join(' and ')
    notify.warning(`${to.meta.title ?? 'That screen'} is for ${who} only; here is your home screen.`)
    return { name: HOME_ROUTE[user.role] }
  }
  return true
}

export function createAppRouter(history: RouterHistory = createWebHistory()): Router {
  const router = createRouter({ history, routes, scrollBehavior: () => ({ top: 0 }) })
  router.beforeEach(guard)
  router.afterEach((to) => {
    if (typeof document !== 'undefined') document.title = to.meta.title ? `${to.meta.title} · Lineweight` : 'Lineweight'
  })
  return router
}
