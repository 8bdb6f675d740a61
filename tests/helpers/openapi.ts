import { Ajv2020 } from 'ajv/dist/2020.js'
import addFormats from 'ajv-formats'
import type { ValidateFunction } from 'ajv'
import { openApiDocument } from '../../server/openapi'
import type { RouteDef } from '../../server/routes/route'

/** A JSON answer of the API as a test saw it. */
export interface Answer {
  method: string
  /** Express path of the route that answered, or null when none matched. */
  route: string | null
  status: number
  body: unknown
}

type Doc = { paths: Record<string, Record<string, { responses: Record<string, { content?: Record<string, { schema: unknown }> }> }>> }

const pointer = (...parts: string[]) => `openapi.json#/${parts.map((p) => p.replace(/~/g, '~0').replace(/\//g, '~1')).join('/')}`

/**
 * Checks answers against the OpenAPI document of the route table with a JSON Schema 2020-12 validator
 * (OpenAPI 3.1 schemas are JSON Schema 2020-12); returns what did not fit.
 */
export function answerChecker(routes: RouteDef[]) {
  const doc = openApiDocument(routes, 'test') as unknown as Doc
  const ajv = new Ajv2020({ strict: false, allErrors: false })
  addFormats.default(ajv)
  ajv.addSchema(doc, 'openapi.json')
  const compiled = new Map<string, ValidateFunction>()
  return (a: Answer): string | null => {
    if (a.route === null) return null
    const path = a.route.replace(/:([A-Za-z_]+)/g, '{$1}')
    const op = doc.paths[path]?.[a.method]
    if (!op) return `${a.method} ${path} is not in the document`
    const code = op.responses[String(a.status)] ? String(a.status) : 'default'
    const media = op.responses[code]?.content?.['application/json']
    if (!media) return `${a.method} ${path} answered ${a.status} with JSON, which the document does not list`
    const key = pointer('paths', path, a.method, 'responses', code, 'content', 'application/json', 'schema')
    let validate = compiled.get(key)
    if (!validate) {
      validate = ajv.getSchema(key)!
      compiled.set(key, validate)
    }
    if (validate(a.body)) return null
    return `${a.method} ${path} ${a.status}: ${ajv.errorsText(validate.errors)} in ${JSON.stringify(a.body).slice(0, 300)}`
  }
}
