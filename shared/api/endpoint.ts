import { z } from 'zod'

export type HttpMethod = 'get' | 'post' | 'patch' | 'put' | 'delete'

/** The names of the `:name` segments of an Express path. */
export type PathParamNames<P extends string> = P extends `${string}:${infer Name}/${infer Rest}` ? Name | PathParamNames<`/${Rest}`> : P extends `${string}:${infer Name}` ? Name : never

/** A body that is not JSON: a file download or a binary series. */
export interface BinaryBody {
  kind: 'binary'
  contentType: string
  description: string
}

export const binaryBody = (contentType: string, description: string): BinaryBody => ({ kind: 'binary', contentType, description })

/** No body at all (204). */
export interface NoBody {
  kind: 'none'
}
export const noBody: NoBody = { kind: 'none' }

export type ResponseSpec = z.ZodType | BinaryBody | NoBody

/** Request parts; a path with `:name` segments must declare a params schema with those keys. */
type ParamsPart<P extends string> = [PathParamNames<P>] extends [never] ? { params?: undefined } : { params: z.ZodType<Record<PathParamNames<P>, unknown>> }

/**
 * One API route as both sides see it: method, path, request schemas and response schema. The
 * server's route table gives each endpoint its access rule and handler; the client calls it with
 * `call()`; the OpenAPI document is generated from it.
 */
export type Endpoint<
  M extends HttpMethod = HttpMethod,
  P extends string = string,
  Q extends z.ZodType | undefined = z.ZodType | undefined,
  B extends z.ZodType | undefined = z.ZodType | undefined,
  R extends ResponseSpec = ResponseSpec,
  Par extends z.ZodType | undefined = z.ZodType | undefined,
> = {
  method: M
  /** Path under /api, Express syntax. */
  path: P
  /** One line for the reference: what the route does. */
  summary: string
  description?: string
  /** The group the reference lists it under. */
  tag: string
  /** Request parts; undefined where the route takes none. */
  params: Par
  query: Q
  body: B
  /** multipart/form-data: the body schema holds the form's text fields; files come in `files`. */
  multipart?: boolean
  /** The success status. @default 200 */
  status?: 200 | 201 | 202 | 204
  response: R
  /** Other answers with a body of their own (the usual error body is implied for every route). */
  otherResponses?: Record<number, { description: string; schema: z.ZodType }>
}

/**
 * Declares an endpoint. The path's `:name` segments must have a params schema, and every endpoint
 * has a response schema, so an endpoint without schemas does not compile.
 */
export function endpoint<
  const M extends HttpMethod,
  const P extends string,
  R extends ResponseSpec,
  Q extends z.ZodType | undefined = undefined,
  B extends z.ZodType | undefined = undefined,
  Par extends z.ZodType | undefined = undefined,
>(
  spec: {
    method: M
    path: P
    summary: string
    description?: string
    tag: string
    query?: Q
    body?: B
    multipart?: boolean
    status?: 200 | 201 | 202 | 204
    response: R
    otherResponses?: Record<number, { description: string; schema: z.ZodType }>
  } & ParamsPart<P> & { params?: Par },
): Endpoint<M, P, Q, B, R, Par> {
  return spec as Endpoint<M, P, Q, B, R, Par>
}

type Parsed<S> = S extends z.ZodType ? z.output<S> : undefined

/** What a handler gets: the parsed, typed params, query and body (undefined for a part the endpoint does not declare). */
export interface ParsedInput<E extends Endpoint> {
  params: Parsed<E['params']>
  query: Parsed<E['query']>
  body: Parsed<E['body']>
}

/** The JSON a route answers with (void for binary bodies and 204). */
export type ResponseOf<E extends Endpoint> = E['response'] extends z.ZodType ? z.output<E['response']> : void

/**
 * What a client sends for one schema: the schema's input, with values that the schema coerces
 * (input `unknown`, e.g. numbers in a query string) typed as what they become.
 */
export type Sent<S> = S extends z.ZodType ? { [K in keyof z.input<S>]: unknown extends z.input<S>[K] ? (K extends keyof z.output<S> ? z.output<S>[K] | string : unknown) : z.input<S>[K] } : undefined

/** The client's side of a call: the parts the endpoint declares. */
export type RequestOf<E extends Endpoint> = (E['params'] extends z.ZodType ? { params: Sent<E['params']> } : { params?: undefined }) &
  (E['query'] extends z.ZodType ? { query?: Sent<E['query']> } : { query?: undefined }) &
  (E['body'] extends z.ZodType ? { body: Sent<E['body']> } : { body?: undefined })

/** Fills the `:name` segments of a path. */
export function fillPath(path: string, params: Record<string, unknown> | undefined): string {
  return path.replace(/:([A-Za-z_][A-Za-z0-9_]*)/g, (_, name: string) => {
    const value = params?.[name]
    if (value === undefined || value === null) throw new Error(`missing path parameter ${name}`)
    return encodeURIComponent(String(value))
  })
}

/** The body of every refusal: `{ error: { code, message, details } }`. */
export const ErrorBody = z
  .object({
    error: z.object({
      code: z.string().meta({ description: 'Stable, machine-readable reason, e.g. invalid_input, forbidden, not_found, rate_limited.' }),
      message: z.string().meta({ description: 'A sentence for people.' }),
      details: z.record(z.string(), z.unknown()).nullable().meta({ description: 'More about the refusal; `fields` maps field names to messages on 422.' }),
    }),
  })
  .meta({ id: 'Error' })
export type ErrorBody = z.infer<typeof ErrorBody>

/** `{ message }`: routes that only report that something was done. */
export const MessageReply = z.object({ message: z.string() }).meta({ id: 'MessageReply' })
export type MessageReply = z.infer<typeof MessageReply>
