/** Reading the server's OpenAPI 3.1 document for the reference screen (plain JSON Schema, refs into components). */

export type JsonSchema = {
  $ref?: string
  type?: string | string[]
  properties?: Record<string, JsonSchema>
  required?: string[]
  items?: JsonSchema
  prefixItems?: JsonSchema[]
  additionalProperties?: JsonSchema | boolean
  anyOf?: JsonSchema[]
  oneOf?: JsonSchema[]
  allOf?: JsonSchema[]
  enum?: unknown[]
  const?: unknown
  format?: string
  description?: string
  default?: unknown
  minimum?: number
  maximum?: number
  exclusiveMinimum?: number
  minLength?: number
  maxLength?: number
  pattern?: string
  maxItems?: number
}

export interface Parameter {
  name: string
  in: 'path' | 'query' | 'header' | 'cookie'
  required?: boolean
  description?: string
  schema?: JsonSchema
}

export interface Operation {
  operationId?: string
  summary?: string
  description?: string
  tags?: string[]
  'x-access'?: 'public' | 'signed-in' | string[]
  parameters?: Parameter[]
  requestBody?: { content: Record<string, { schema?: JsonSchema }> }
  responses: Record<string, { description: string; content?: Record<string, { schema?: JsonSchema }> }>
}

export interface OpenApiDoc {
  openapi: string
  info: { title: string; version: string; description?: string }
  paths: Record<string, Record<string, Operation>>
  components?: { schemas?: Record<string, JsonSchema> }
}

export interface OperationEntry {
  method: string
  path: string
  op: Operation
}

export const METHOD_ORDER = ['get', 'post', 'put', 'patch', 'delete']

/** Operations grouped by their first tag, groups and operations in a stable order. */
export function operationsByTag(doc: OpenApiDoc): { tag: string; operations: OperationEntry[] }[] {
  const groups = new Map<string, OperationEntry[]>()
  for (const [path, ops] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(ops)) {
      const tag = op.tags?.[0] ?? 'Other'
      groups.set(tag, [...(groups.get(tag) ?? []), { method, path, op }])
    }
  }
  return [...groups]
    .map(([tag, operations]) => ({ tag, operations: operations.sort((a, b) => a.path.localeCompare(b.path) || METHOD_ORDER.indexOf(a.method) - METHOD_ORDER.indexOf(b.method)) }))
    .sort((a, b) => a.tag.localeCompare(b.tag))
}

/** The component a `$ref` names ("#/components/schemas/X" → X and its schema). */
export function resolveRef(doc: OpenApiDoc, schema: JsonSchema): { name: string | null; schema: JsonSchema } {
  if (!schema.$ref) return { name: null, schema }
  const name = schema.$ref.replace('#/components/schemas/', '')
  return { name, schema: doc.components?.schemas?.[name] ?? {} }
}

/** A short type label: "string", "integer | null", "array of CallView", "one of 3". */
export function typeLabel(doc: OpenApiDoc, schema: JsonSchema): string {
  if (schema.$ref) return resolveRef(doc, schema).name ?? 'object'
  if (schema.const !== undefined) return JSON.stringify(schema.const)
  if (schema.enum) return schema.enum.map((v) => JSON.stringify(v)).join(' | ')
  const alts = schema.anyOf ?? schema.oneOf
  if (alts) {
    const labels = alts.map((a) => typeLabel(doc, a))
    return labels.length <= 3 ? labels.join(' | ') : `one of ${labels.length}`
  }
  const types = Array.isArray(schema.type) ? schema.type : schema.type ? [schema.type] : []
  return (
    types
      .map((t) => {
        if (t === 'array') return schema.prefixItems ? `[${schema.prefixItems.map((i) => typeLabel(doc, i)).join(', ')}]` : `array of ${schema.items ? typeLabel(doc, schema.items) : 'any'}`
        if (t === 'object' && !schema.properties && typeof schema.additionalProperties === 'object') return `map of ${typeLabel(doc, schema.additionalProperties)}`
        return schema.format && t === 'string' ? `string (${schema.format})` : t
      })
      .join(' | ') || 'any'
  )
}

/** Limits worth reading next to a field: bounds, lengths, pattern, default. */
export function constraintsOf(schema: JsonSchema): string[] {
  const out: string[] = []
  // Whole numbers carry the safe-integer bounds of JavaScript; they say nothing to a reader.
  const told = (v: number | undefined): v is number => v !== undefined && Math.abs(v) < Number.MAX_SAFE_INTEGER
  if (told(schema.minimum)) out.push(`≥ ${schema.minimum}`)
  if (told(schema.exclusiveMinimum)) out.push(`> ${schema.exclusiveMinimum}`)
  if (told(schema.maximum)) out.push(`≤ ${schema.maximum}`)
  if (schema.minLength !== undefined && schema.minLength > 0) out.push(schema.minLength === 1 ? 'not empty' : `at least ${schema.minLength} characters`)
  if (schema.maxLength !== undefined) out.push(`at most ${schema.maxLength} characters`)
  if (schema.maxItems !== undefined) out.push(`at most ${schema.maxItems} items`)
  if (schema.pattern) out.push(`matches ${schema.pattern}`)
  if (schema.default !== undefined) out.push(`default ${JSON.stringify(schema.default)}`)
  return out
}

/** The fields of an object schema (following a ref and merging allOf), or null when it has none. */
export function fieldsOf(doc: OpenApiDoc, schema: JsonSchema): { name: string; required: boolean; schema: JsonSchema }[] | null {
  const s = resolveRef(doc, schema).schema
  const parts = s.allOf ? s.allOf.map((p) => resolveRef(doc, p).schema) : [s]
  const fields = parts.flatMap((p) => Object.entries(p.properties ?? {}).map(([name, f]) => ({ name, required: (p.required ?? []).includes(name), schema: f })))
  return fields.length > 0 ? fields : null
}

/** Schemas a field's value can be, for drawing nested fields (objects, arrays of objects, alternatives). */
export function nestedOf(doc: OpenApiDoc, schema: JsonSchema): JsonSchema[] {
  const s = resolveRef(doc, schema).schema
  if (s.anyOf || s.oneOf) return (s.anyOf ?? s.oneOf)!.flatMap((a) => nestedOf(doc, a))
  if (s.items) return nestedOf(doc, s.items)
  if (typeof s.additionalProperties === 'object' && !s.properties) return nestedOf(doc, s.additionalProperties)
  return fieldsOf(doc, s) ? [schema] : []
}
