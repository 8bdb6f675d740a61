import { Validator } from '@seriousme/openapi-schema-validator'
import supertest from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { apiRoutes } from '../../server/routes'
import { closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { answerChecker } from '../helpers/openapi'
import { signedInPerson, type Person } from '../helpers/review'

let t: TestContext
let observer: Person
let doc: { openapi: string; paths: Record<string, Record<string, { tags?: string[]; summary?: string; 'x-access'?: unknown }>> }
beforeAll(async () => {
  t = await createTestContext()
  observer = await signedInPerson(t.app, 'observer', 'Reader of the reference')
  doc = (await observer.client.agent.get('/api/openapi.json').expect(200)).body
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('GET /api/openapi.json', () => {
  it('is for signed-in people (session or token)', async () => {
    await supertest(t.app).get('/api/openapi.json').expect(401)
  })

  it('lists every route of the route table, with its access rule', () => {
    const listed = Object.entries(doc.paths).flatMap(([path, ops]) => Object.keys(ops).map((m) => `${m} ${path}`))
    const table = apiRoutes(t.ctx).map((r) => `${r.method} ${r.path.replace(/:([A-Za-z_]+)/g, '{$1}')}`)
    expect(listed.sort()).toEqual([...new Set(table)].sort())
    for (const ops of Object.values(doc.paths)) for (const op of Object.values(ops)) expect(op.summary && op.tags?.length && op['x-access']).toBeTruthy()
  })

  it('is a valid OpenAPI 3.1 document', async () => {
    expect(doc.openapi).toBe('3.1.0')
    const result = await new Validator().validate(structuredClone(doc) as never)
    expect(result.errors ?? []).toEqual([])
    expect(result.valid).toBe(true)
  })

  it('catches an answer that does not fit it', () => {
    const check = answerChecker(apiRoutes(t.ctx))
    expect(check({ method: 'get', route: '/campaigns/:id', status: 200, body: { campaign: { id: 'one' } } })).toMatch(/^get \/campaigns\/\{id\} 200: /)
    expect(check({ method: 'get', route: '/campaigns/:id', status: 404, body: { error: { code: 'not_found', message: 'No.', details: null } } })).toBeNull()
  })
})
