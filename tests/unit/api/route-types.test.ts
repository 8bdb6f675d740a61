import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { endpoint, fillPath } from '../../../shared/api/endpoint'
import { route } from '../../../server/routes/route'

// These lines are checked by `vue-tsc -b` (part of npm test): each @ts-expect-error must meet a type error,
// so a handler that reads a field its schema lacks, or a route without schemas, fails the type check.
const rename = endpoint({
  method: 'patch',
  path: '/things/:id',
  tag: 'Things',
  summary: 'Rename a thing',
  params: z.object({ id: z.coerce.number() }),
  body: z.object({ name: z.string() }),
  response: z.object({ name: z.string() }),
})

export const typedRoutes = [
  route(rename, { access: 'signed-in', handler: ({ params, body }) => ({ name: `${body.name} #${params.id}` }) }),
  route(rename, {
    access: 'signed-in',
    // @ts-expect-error the body schema has no `title`
    handler: ({ body }) => ({ name: body.title }),
  }),
  route(rename, {
    access: 'signed-in',
    // @ts-expect-error the endpoint declares no query
    handler: ({ query }) => ({ name: query.name }),
  }),
  route(rename, {
    access: 'signed-in',
    // @ts-expect-error the answer must fit the response schema
    handler: () => ({ title: 'x' }),
  }),
]

// @ts-expect-error a path with :id needs a params schema
export const noParams = endpoint({ method: 'get', path: '/things/:id', tag: 'Things', summary: 'One thing', response: z.object({}) })

// @ts-expect-error every endpoint has a response schema
export const noResponse = endpoint({ method: 'get', path: '/things', tag: 'Things', summary: 'All things' })

describe('typed routes', () => {
  it('fills path parameters and refuses a missing one', () => {
    expect(fillPath('/things/:id/parts/:partId', { id: 3, partId: 'a b' })).toBe('/things/3/parts/a%20b')
    expect(() => fillPath('/things/:id', {})).toThrow('missing path parameter id')
  })

  it('hands the handler parsed input and refuses input that does not fit, field by field', async () => {
    const def = typedRoutes[0]!
    let sent: unknown = null
    const res = { statusCode: 200, headersSent: false, status: () => res, json: (b: unknown) => (sent = b), end: () => undefined }
    await def.handler({ params: { id: '7' }, query: {}, body: { name: 'Vega' }, user: { id: 1 } } as never, res as never, () => undefined)
    expect(sent).toEqual({ name: 'Vega #7' })
    await expect(Promise.resolve(def.handler({ params: { id: 'x' }, query: {}, body: {}, user: { id: 1 } } as never, res as never, () => undefined))).rejects.toMatchObject({
      status: 422,
      details: { fields: { id: expect.any(String) } },
    })
  })
})
