import { z } from 'zod'
import { endpoint } from './endpoint'

export const docsApi = {
  openapi: endpoint({
    method: 'get',
    path: '/openapi.json',
    tag: 'Service',
    summary: 'This reference as an OpenAPI 3.1 document, generated from the schemas the server validates with',
    response: z.record(z.string(), z.unknown()).meta({ description: 'An OpenAPI 3.1 document.' }),
  }),
}
