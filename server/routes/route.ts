import type { Request, RequestHandler, Response } from 'express'
import type { ZodError, ZodType } from 'zod'
import type { Endpoint, ParsedInput, ResponseOf } from '../../shared/api/endpoint'
import type { Role } from '../../shared/roles'
import { HttpError } from '../lib/http-error'
import type { User } from '../models'

/** Who may call a route: anyone, any signed-in user, or the listed roles. */
export type Access = 'public' | 'signed-in' | readonly Role[]

/** The request without its unparsed parts: handlers read body, query and params from their typed input. */
export type PlainRequest = Omit<Request, 'body' | 'query' | 'params'>

/**
 * A reply already written as JSON (e.g. by a worker thread), sent as it is. A large reply sent
 * many times comes as bytes with its entity tag, so neither is worked out again per request.
 */
export class JsonText {
  constructor(
    readonly text: string | Buffer,
    readonly etag?: string,
  ) {}
}

export interface RouteImpl<E extends Endpoint, A extends Access> {
  access: A
  /** Middleware that runs after the role check and before validation, e.g. the upload parser. */
  before?: RequestHandler[]
  /** Gets the parsed input; what it returns is sent as JSON with the endpoint's status. Binary routes write `res` themselves. */
  handler: (input: ParsedInput<E> & { user: A extends 'public' ? User | null : User }, http: { req: PlainRequest; res: Response }) => ResponseOf<E> | JsonText | Promise<ResponseOf<E> | JsonText>
}

/** One API route: the shared endpoint, its access rule and the Express handlers that serve it. */
export interface RouteDef {
  method: Endpoint['method']
  /** Path under /api, Express syntax. */
  path: string
  access: Access
  endpoint: Endpoint
  before: RequestHandler[]
  handler: RequestHandler
}

function fieldErrors(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.join('.') || '_'
    out[key] ??= issue.message
  }
  return out
}

function parsePart(schema: ZodType | undefined, value: unknown): unknown {
  if (!schema) return undefined
  const result = schema.safeParse(value ?? {})
  if (!result.success) throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: fieldErrors(result.error) })
  return result.data
}

/** Binds an endpoint to its access rule and handler; the handler's input is typed by the endpoint's schemas. */
export function route<E extends Endpoint, const A extends Access>(endpoint: E, impl: RouteImpl<E, A>): RouteDef {
  const handler: RequestHandler = async (req, res) => {
    const input = {
      params: parsePart(endpoint.params, req.params),
      query: parsePart(endpoint.query, req.query),
      body: parsePart(endpoint.body, req.body),
      user: (req.user as User | undefined) ?? null,
    } as ParsedInput<E> & { user: User }
    const reply = await impl.handler(input, { req, res })
    if (res.headersSent) return
    if (endpoint.status && res.statusCode === 200) res.status(endpoint.status)
    if (reply === undefined) res.end()
    else if (reply instanceof JsonText) {
      // With the tag set, Express answers 304 to a matching If-None-Match and hashes nothing.
      if (reply.etag) res.set('ETag', reply.etag)
      res.type('application/json').send(reply.text)
    } else res.json(reply)
  }
  return { method: endpoint.method, path: endpoint.path, access: impl.access, endpoint, before: impl.before ?? [], handler }
}

export const STAFF = ['classifier', 'lead'] as const satisfies readonly Role[]
export const LEAD = ['lead'] as const satisfies readonly Role[]
export const SUBMITTERS = ['observer', 'lead'] as const satisfies readonly Role[]
