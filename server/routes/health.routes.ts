import type { AppContext } from '../context'
import { defineRoutes } from './route'

export function healthRoutes(ctx: AppContext) {
  return defineRoutes([
    {
      method: 'get',
      path: '/health',
      access: 'public',
      handler: async (_req, res) => {
        try {
          await ctx.sequelize.query('SELECT 1')
          res.json({ status: 'ok', database: 'ok' })
        } catch {
          res.set('retry-after', String(ctx.config.DB_RETRY_AFTER_SECONDS))
          res.status(503).json({ status: 'degraded', database: 'unreachable' })
        }
      },
    },
  ])
}
