import { readFileSync } from 'node:fs'
import { docsApi } from '../../shared/api/docs'
import { openApiDocument } from '../openapi'
import { route, type RouteDef } from './route'

const VERSION = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }).version

/** The OpenAPI document of the whole table (this route included), built once on first request. */
export function docsRoutes(table: () => RouteDef[]) {
  let document: Record<string, unknown> | null = null
  return [
    route(docsApi.openapi, {
      access: 'signed-in',
      handler: () => {
        document ??= openApiDocument(table(), VERSION) as unknown as Record<string, unknown>
        return document
      },
    }),
  ]
}
