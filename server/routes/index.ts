import type { AppContext } from '../context'
import { auditRoutes } from './audit.routes'
import { authRoutes } from './auth.routes'
import { campaignRoutes } from './campaigns.routes'
import { docsRoutes } from './docs.routes'
import { healthRoutes } from './health.routes'
import { instrumentRoutes } from './instruments.routes'
import { outboxRoutes } from './outbox.routes'
import { derivedRoutes, releaseRoutes } from './releases.routes'
import { reviewRoutes } from './review.routes'
import type { RouteDef } from './route'
import { spectraRoutes } from './spectra.routes'
import { standardsRoutes } from './standards.routes'
import { tokenRoutes } from './tokens.routes'
import { userRoutes } from './users.routes'

/** Every API route in one table: the app mounts it and the role-matrix test walks it. */
export function apiRoutes(ctx: AppContext): RouteDef[] {
  const table: RouteDef[] = [
    ...healthRoutes(ctx),
    ...authRoutes(ctx),
    ...userRoutes(ctx),
    ...tokenRoutes(),
    ...outboxRoutes(),
    ...campaignRoutes(ctx),
    ...spectraRoutes(ctx),
    ...reviewRoutes(ctx),
    ...standardsRoutes(ctx),
    ...instrumentRoutes(ctx),
    ...auditRoutes(),
    ...releaseRoutes(),
    ...derivedRoutes(),
  ]
  table.push(...docsRoutes(() => table))
  return table
}
