import type { z } from 'zod'
import { createDocument, type ZodOpenApiOperationObject, type ZodOpenApiPathsObject, type ZodOpenApiResponseObject, type oas31 } from 'zod-openapi'
import { ErrorBody, type Endpoint } from '../shared/api/endpoint'
import type { RouteDef } from './routes/route'

const STATUS_TEXT: Record<number, string> = { 200: 'OK', 201: 'Created', 202: 'Accepted', 204: 'No content' }

/** The object schema inside transforms and refinements (path and query parameters are listed one by one). */
function objectOf(schema: z.ZodType): z.ZodObject {
  let s = schema as unknown as { _zod: { def: { type: string; in?: unknown } } }
  while (s._zod.def.type === 'pipe') s = s._zod.def.in as typeof s
  if (s._zod.def.type !== 'object') throw new Error(`parameters must be an object schema, not ${s._zod.def.type}`)
  return s as unknown as z.ZodObject
}

function accessText(access: RouteDef['access']): string {
  if (access === 'public') return 'Anyone, signed in or not.'
  if (access === 'signed-in') return 'Any signed-in person (session or API token).'
  return `Signed-in ${access.join(' or ')} (session or API token).`
}

function operation(route: RouteDef): ZodOpenApiOperationObject {
  const e: Endpoint = route.endpoint
  const status = e.status ?? 200
  const success: ZodOpenApiResponseObject =
    'kind' in e.response
      ? e.response.kind === 'binary'
        ? { description: e.response.description, content: { [e.response.contentType]: { schema: { type: 'string', format: 'binary' } } } }
        : { description: STATUS_TEXT[status] ?? 'OK' }
      : { description: STATUS_TEXT[status] ?? 'OK', content: { 'application/json': { schema: e.response } } }
  const responses: Record<string, ZodOpenApiResponseObject> = { [String(status)]: success }
  for (const [code, other] of Object.entries(e.otherResponses ?? {})) responses[code] = { description: other.description, content: { 'application/json': { schema: other.schema } } }
  responses.default = { description: 'A refusal: 4xx for the request, 5xx for the server', content: { 'application/json': { schema: ErrorBody } } }
  const op: ZodOpenApiOperationObject = {
    operationId: `${e.method}${e.path.replace(/\/:?([a-zA-Z]+)/g, (_, w: string) => w[0]!.toUpperCase() + w.slice(1))}`,
    summary: e.summary,
    description: [e.description, `**Who:** ${accessText(route.access)}`].filter(Boolean).join('\n\n'),
    tags: [e.tag],
    'x-access': route.access === 'public' || route.access === 'signed-in' ? route.access : [...route.access],
    security: route.access === 'public' ? [] : [{ session: [] }, { token: [] }],
    responses,
  }
  if (e.params || e.query) op.requestParams = { ...(e.params ? { path: objectOf(e.params) } : {}), ...(e.query ? { query: objectOf(e.query) } : {}) }
  if (e.body) {
    const type = e.multipart ? 'multipart/form-data' : 'application/json'
    op.requestBody = { required: true, content: { [type]: { schema: e.body } } }
  }
  return op
}

/** The OpenAPI 3.1 document of every route in the table, generated from the same zod schemas. */
export function openApiDocument(routes: RouteDef[], version: string): oas31.OpenAPIObject {
  const paths: ZodOpenApiPathsObject = {}
  for (const r of routes) {
    const path = r.path.replace(/:([A-Za-z_]+)/g, '{$1}')
    paths[path] = { ...paths[path], [r.method]: operation(r) }
  }
  return createDocument(
    {
      openapi: '3.1.0',
      info: {
        title: 'Lineweight API',
        version,
        description:
          'MK classification of stellar spectra. Every path is under `/api`. Browsers use a session cookie and send the session’s CSRF token as `x-csrf-token` on every request that changes something; pipelines send a personal API token as `Authorization: Bearer <token>` and need neither. Refusals answer `{ error: { code, message, details } }`.',
      },
      servers: [{ url: '/api' }],
      components: {
        securitySchemes: {
          session: { type: 'apiKey', in: 'cookie', name: 'lw.sid', description: 'The browser session (sign in at POST /auth/login).' },
          token: { type: 'http', scheme: 'bearer', description: 'A personal API token (My account → API tokens).' },
        },
      },
      paths,
    },
    { reused: 'inline' },
  )
}
