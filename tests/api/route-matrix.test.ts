import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { apiRoutes } from '../../server/routes'
import { ROLES } from '../../shared/roles'
import { agentFor, closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { send, type Client, type Person } from '../helpers/review'
import { twoCampaigns } from '../helpers/world'

/**
 * The expected answer of every route to every role, written out by hand from the product's access
 * rules (DESIGN.md's API table), not derived from the route table. `A` is a campaign the observer
 * (who submitted spectrum `S`) and the classifier belong to; `R` is a release of A. `N` is an id that
 * does not exist. Bodies are empty (`{}`) unless given, so an allowed write usually answers 422.
 */
type Row = [method: 'get' | 'post' | 'patch' | 'put' | 'delete', path: string, anonymous: number, observer: number, classifier: number, lead: number]
const MATRIX: Row[] = [
  ['get', '/health', 200, 200, 200, 200],
  ['get', '/auth/csrf', 200, 200, 200, 200],
  ['post', '/auth/login', 422, 422, 422, 422],
  ['post', '/auth/logout', 200, 200, 200, 200],
  ['post', '/auth/forgot', 422, 422, 422, 422],
  ['get', '/auth/token', 422, 422, 422, 422],
  ['post', '/auth/set-password', 422, 422, 422, 422],
  ['get', '/me', 401, 200, 200, 200],
  ['post', '/me/password', 401, 422, 422, 422],
  ['get', '/me/tokens', 401, 200, 200, 200],
  ['post', '/me/tokens', 401, 422, 422, 422],
  ['delete', '/me/tokens/N', 401, 404, 404, 404],
  ['get', '/tokens', 401, 403, 403, 200],
  ['delete', '/tokens/N', 401, 403, 403, 404],
  ['get', '/openapi.json', 401, 200, 200, 200],
  ['get', '/users', 401, 403, 403, 200],
  ['post', '/users', 401, 403, 403, 422],
  ['patch', '/users/N', 401, 403, 403, 422],
  ['post', '/users/N/invitation', 401, 403, 403, 404],
  ['get', '/outbox', 401, 403, 403, 200],
  ['get', '/outbox/N', 401, 403, 403, 404],
  ['get', '/campaigns', 401, 200, 200, 200],
  ['post', '/campaigns', 401, 403, 403, 422],
  ['get', '/campaigns/A', 401, 200, 200, 200],
  ['patch', '/campaigns/A', 401, 403, 403, 422],
  ['put', '/campaigns/A/members', 401, 403, 403, 422],
  ['post', '/campaigns/A/members', 401, 403, 403, 422],
  ['delete', '/campaigns/N/members/N', 401, 403, 403, 404],
  ['post', '/campaigns/N/resuggest', 401, 403, 403, 404],
  ['get', '/campaigns/A/hr', 401, 403, 403, 200],
  ['post', '/spectra', 401, 422, 403, 422],
  ['post', '/spectra/known', 401, 422, 403, 422],
  ['get', '/spectra', 401, 200, 200, 200],
  ['get', '/spectra/S', 401, 200, 200, 200],
  ['patch', '/spectra/S', 401, 200, 403, 200],
  ['delete', '/spectra/N', 401, 404, 403, 404],
  ['get', '/spectra/S/status', 401, 200, 200, 200],
  ['post', '/spectra/N/process', 401, 404, 403, 404],
  ['get', '/spectra/S/prepared', 401, 200, 200, 200],
  ['get', '/spectra/S/data', 401, 404, 404, 404],
  ['get', '/spectra/S/file', 401, 404, 404, 404],
  ['get', '/spectra/S/history', 401, 200, 200, 200],
  ['get', '/spectra/S/derived', 401, 200, 200, 200],
  ['get', '/spectra/S/review', 401, 403, 200, 200],
  ['post', '/spectra/S/calls', 401, 403, 422, 422],
  ['get', '/queue', 401, 403, 200, 200],
  ['get', '/queue/next', 401, 403, 200, 200],
  // The classifier's claim holds the item, so the lead after them is told it is taken.
  ['post', '/queue/S/claim', 401, 403, 200, 409],
  ['delete', '/queue/S/claim', 401, 403, 204, 204],
  ['get', '/disputes', 401, 403, 403, 200],
  ['get', '/disputes/N', 401, 403, 403, 404],
  ['post', '/disputes/N/settle', 401, 403, 403, 422],
  ['post', '/disputes/N/answer', 401, 403, 403, 422],
  ['get', '/standards', 401, 403, 200, 200],
  ['post', '/standards', 401, 403, 403, 422],
  ['post', '/standards/versions', 401, 403, 403, 422],
  ['post', '/standards/N/retire', 401, 403, 403, 404],
  ['get', '/standards/N/data', 401, 403, 404, 404],
  ['get', '/instruments', 401, 200, 200, 200],
  ['post', '/instruments', 401, 403, 403, 422],
  ['get', '/instruments/N', 401, 404, 404, 404],
  ['patch', '/instruments/N', 401, 403, 403, 404],
  ['get', '/instruments/N/candidates', 401, 403, 404, 404],
  ['post', '/instruments/N/promote', 401, 403, 403, 422],
  ['post', '/instruments/N/demote', 401, 403, 403, 422],
  ['get', '/audit', 401, 403, 403, 422],
  ['get', '/releases', 401, 200, 200, 200],
  ['post', '/releases', 401, 403, 403, 422],
  ['get', '/releases/preview', 401, 403, 403, 422],
  ['get', '/releases/R', 401, 200, 200, 200],
  ['post', '/releases/R/supersede', 401, 403, 403, 422],
  ['get', '/releases/R/download?format=csv', 401, 200, 200, 200],
]

/** Someone outside the owner or the campaign asks for what is not theirs: the thing does not exist for them. */
type Cross = [who: 'observerB' | 'classifierB' | 'observerSameCampaign', method: 'get' | 'post' | 'patch', path: string, status: number, body?: object]
const CROSS: Cross[] = [
  ['observerB', 'get', '/spectra/S', 404],
  ['observerB', 'patch', '/spectra/S', 404],
  ['observerB', 'post', '/spectra/S/process', 404],
  ['observerB', 'get', '/spectra/S/history', 404],
  ['observerB', 'get', '/spectra/S/derived', 404],
  ['observerB', 'get', '/spectra/S/prepared', 404],
  ['observerB', 'get', '/campaigns/A', 404],
  ['observerB', 'get', '/releases/R', 404],
  ['observerB', 'get', '/releases/R/download?format=csv', 404],
  ['observerB', 'get', '/releases/R/download?format=fits', 404],
  ['classifierB', 'get', '/spectra/S', 404],
  ['classifierB', 'get', '/spectra/S/review', 404],
  ['classifierB', 'post', '/queue/S/claim', 404],
  ['classifierB', 'post', '/spectra/S/calls', 404, { acceptedSuggestion: true, confidence: 2 }],
  ['classifierB', 'get', '/releases/R', 404],
  ['classifierB', 'get', '/releases/R/download?format=votable', 404],
  ['classifierB', 'get', '/releases/R/download?format=mrt', 404],
  ['classifierB', 'get', '/disputes', 403],
  // A member of the campaign sees its releases, but only their own spectra.
  ['observerSameCampaign', 'get', '/spectra/S', 404],
  ['observerSameCampaign', 'patch', '/spectra/S', 404],
  ['observerSameCampaign', 'get', '/releases/R', 200],
]

let t: TestContext
let w: Awaited<ReturnType<typeof twoCampaigns>>

beforeAll(async () => {
  t = await createTestContext()
  w = await twoCampaigns(t.app, t.ctx.sequelize)
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const concrete = (path: string) =>
  `/api${path
    .replace(/\/S(?=\/|$|\?)/, `/${w.spectrum.id}`)
    .replace(/\/A(?=\/|$)/, `/${w.a.id}`)
    .replace(/\/R(?=\/|$|\?)/, `/${w.release.id}`)
    .replace(/\/N(?=\/|$)/g, '/999999999')}`

function request(client: Client, method: Row[0], path: string, body: object = {}) {
  return method === 'get' ? client.agent.get(concrete(path)) : send(client, method, concrete(path), body)
}

describe('every route × every role', () => {
  it('lists every route of the server once', () => {
    const served = apiRoutes(t.ctx)
      .map((r) => `${r.method} ${r.path.replace(/:id|:spectrumId/, 'X').replace(/:userId/, 'X')}`)
      .sort()
    const listed = MATRIX.map(
      ([m, p]) =>
        `${m} ${p
          .replace(/\?.*$/, '')
          .replace(/\/(S|A|R|N)(?=\/|$)/, '/X')
          .replace(/\/N(?=\/|$)/, '/X')}`,
    ).sort()
    expect(listed).toEqual(served)
  })

  it('answers each role with the status written in the table', async () => {
    const clients: Record<string, Person['client']> = {
      observer: w.observer.client,
      classifier: w.classifier.client,
      lead: w.lead.client,
    }
    const failures: string[] = []
    for (const [method, path, ...expected] of MATRIX) {
      for (const [i, as] of (['anonymous', ...ROLES] as const).entries()) {
        // Signing out ends the session, so that row gets a client of its own.
        const fresh = as === 'anonymous' || path === '/auth/logout'
        const client = fresh ? await agentFor(t.app) : clients[as]!
        if (fresh && as !== 'anonymous') {
          const who = as === 'observer' ? w.observer : as === 'classifier' ? w.classifier : w.lead
          const login = await send(client, 'post', '/api/auth/login', { email: who.user.email, password: 'correct horse battery' })
          client.csrf = login.body.csrfToken
        }
        const res = await request(client, method, path)
        if (res.status !== expected[i]) failures.push(`${method.toUpperCase()} ${path} as ${as}: got ${res.status} ${res.body?.error?.code ?? ''}, wanted ${expected[i]}`)
      }
    }
    expect(failures).toEqual([])
  }, 120_000)
})

describe('other people’s spectra, campaigns and releases', () => {
  it('are not there for someone outside the owner or the campaign', async () => {
    const failures: string[] = []
    for (const [who, method, path, status, body] of CROSS) {
      const res = await request(w[who].client, method, path, body)
      if (res.status !== status) failures.push(`${method.toUpperCase()} ${path} as ${who}: got ${res.status} ${res.body?.error?.code ?? ''}, wanted ${status}`)
    }
    expect(failures).toEqual([])
  })

  it('leave them out of lists and queues', async () => {
    const releases = await w.classifierB.client.agent.get('/api/releases').expect(200)
    expect(releases.body.releases.map((r: { id: number }) => r.id)).not.toContain(w.release.id)
    const memberReleases = await w.observerSameCampaign.client.agent.get('/api/releases').expect(200)
    expect(memberReleases.body.releases.map((r: { id: number }) => r.id)).toContain(w.release.id)
    const filtered = await w.observerB.client.agent.get(`/api/releases?campaign=${w.a.id}`).expect(200)
    expect(filtered.body.releases).toEqual([])
    const spectra = await w.observerB.client.agent.get('/api/spectra').expect(200)
    expect(spectra.body.items.map((s: { id: number }) => s.id)).not.toContain(w.spectrum.id)
    const queue = await w.classifierB.client.agent.get('/api/queue').expect(200)
    expect(queue.body.items.map((s: { spectrumId: number }) => s.spectrumId)).not.toContain(w.spectrum.id)
    const next = await w.classifierB.client.agent.get(`/api/queue/next?campaign=${w.a.id}`).expect(200)
    expect(next.body.item).toBeNull()
  })
})
