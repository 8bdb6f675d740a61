import { healthApi } from '../../shared/api/health'
import type { AppContext } from '../context'
import { route } from './route'

export function healthRoutes(ctx: AppContext) {
  return [
    route(healthApi.get, {
      access: 'public',
      handler: async (_input, { res }) => {
        try {
          await ctx.sequelize.query('SELECT 1')
          return { status: 'ok', database: 'ok' } as const
        } catch {
          res.set('retry-after', String(ctx.config.DB_RETRY_AFTER_SECONDS))
          res.status(503)
          return { status: 'degraded', database: 'unreachable' } as const
        }
      },
    }),
  ]
}
