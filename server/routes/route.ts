import type { RequestHandler } from 'express'
import type { ZodType } from 'zod'
import type { Role } from '../../shared/roles'

/** Who may call a route: anyone, any signed-in user, or the listed roles. */
export type Access = 'public' | 'signed-in' | readonly Role[]

export interface RouteSchema {
  body?: ZodType
  query?: ZodType
  params?: ZodType
}

/** One API route; the app mounts them and the role-matrix test walks the same table. */
export interface RouteDef {
  method: 'get' | 'post' | 'patch' | 'put' | 'delete'
  /** Path under /api, Express syntax. */
  path: string
  access: Access
  schema?: RouteSchema
  /** Middleware that runs after the role check and before validation, e.g. the upload parser. */
  before?: RequestHandler[]
  handler: RequestHandler
}

export const defineRoutes = (routes: RouteDef[]): RouteDef[] => routes

export const STAFF: readonly Role[] = ['classifier', 'lead']
export const LEAD: readonly Role[] = ['lead']
export const SUBMITTERS: readonly Role[] = ['observer', 'lead']
