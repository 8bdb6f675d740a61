import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { apiRoutes } from '../../server/routes'
import type { RouteDef } from '../../server/routes/route'
import { ROLES, type Role } from '../../shared/roles'
import { agentFor, closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'

let t: TestContext
const passwords: Partial<Record<Role, { email: string; password: string }>> = {}

beforeAll(async () => {
  t = await createTestContext()
  for (const role of ROLES) {
    const { user, password } = await makeUser(role)
    passwords[role] = { email: user.email, password }
  }
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const concretePath = (path: string) => `/api${path.replace(/:[A-Za-z]+/g, '999999999')}`

async function call(route: RouteDef, as: Role | 'anonymous') {
  const client = as === 'anonymous' ? await agentFor(t.app) : await signedInAgent(t.app, passwords[as]!.email, passwords[as]!.password)
  const req = client.agent[route.method](concretePath(route.path)).set('x-csrf-token', client.csrf)
  return route.method === 'get' ? req : req.send({})
}

function allowed(route: RouteDef, as: Role | 'anonymous'): 'yes' | 'unauthenticated' | 'forbidden' {
  if (route.access === 'public') return 'yes'
  if (as === 'anonymous') return 'unauthenticated'
  if (route.access === 'signed-in') return 'yes'
  return route.access.includes(as) ? 'yes' : 'forbidden'
}

describe('the API route table', () => {
  it('gives every route an access rule the server understands', () => {
    for (const route of apiRoutes(t.ctx)) {
      const ok = route.access === 'public' || route.access === 'signed-in' || (Array.isArray(route.access) && route.access.length > 0 && route.access.every((r) => ROLES.includes(r)))
      expect(ok, `${route.method.toUpperCase()} ${route.path}`).toBe(true)
    }
  })

  it('has no two routes with the same method and path', () => {
    const keys = apiRoutes(t.ctx).map((r) => `${r.method} ${r.path}`)
    expect(new Set(keys).size).toBe(keys.length)
  })
})

describe('every route × every role', () => {
  it('lets each role reach exactly the routes its rule allows', async () => {
    const failures: string[] = []
    for (const route of apiRoutes(t.ctx)) {
      if (route.path === '/auth/logout' || route.path === '/auth/login' || route.path === '/auth/forgot') continue
      for (const as of ['anonymous', ...ROLES] as const) {
        const res = await call(route, as)
        const expected = allowed(route, as)
        const label = `${route.method.toUpperCase()} ${route.path} as ${as}: got ${res.status} ${res.body?.error?.code ?? ''}`
        if (expected === 'unauthenticated' && res.status !== 401) failures.push(`${label}, wanted 401`)
        if (expected === 'forbidden' && res.status !== 403) failures.push(`${label}, wanted 403`)
        if (expected === 'yes' && (res.status === 401 || res.status === 403)) failures.push(`${label}, wanted access`)
      }
    }
    expect(failures).toEqual([])
  }, 120_000)
})
