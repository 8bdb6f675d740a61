import { docsApi } from '@shared/api/docs'
import type { OpenApiDoc } from '@/lib/openapi'
import { call } from './http'

/** The server's OpenAPI document (generated from the schemas it validates with). */
export const getOpenApi = async (): Promise<OpenApiDoc> => (await call(docsApi.openapi)) as unknown as OpenApiDoc
