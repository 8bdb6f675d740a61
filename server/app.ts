import { existsSync } from 'node:fs'
import { join, resolve } from 'node:path'
import connectSessionSequelize from 'connect-session-sequelize'
import express, { type Express } from 'express'
import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import session from 'express-session'
import helmet from 'helmet'
import passport from 'passport'
import { Strategy as LocalStrategy } from 'passport-local'
import type { AppContext } from './context'
import { requireAccess } from './middleware/auth'
import { bearerAuth, unlessBearer } from './middleware/bearer'
import { csrfProtection } from './middleware/csrf'
import { apiNotFound, errorHandler } from './middleware/error'
import { sessionLifetime } from './middleware/session-lifetime'
import { HttpError } from './lib/http-error'
import { selectRows } from './db/execute'
import { User } from './models'
import { apiRoutes } from './routes'
import { verifyCredentials } from './services/users.service'

const SequelizeStore = connectSessionSequelize(session.Store)

/** Express's "trust proxy" from TRUST_PROXY: a hop count, true/false, or addresses and names such as `loopback`. */
export function trustProxy(value: string | undefined): boolean | number | string {
  if (value === undefined || value === '' || value === '0' || value === 'false') return false
  if (value === 'true') return true
  return /^\d+$/.test(value) ? Number(value) : value
}

export interface AppOptions {
  /** Serve the built client from this folder (index.html fallback for client routes). */
  clientDir?: string
  /** Hears every JSON answer of the API with the route that gave it (tests check them against the OpenAPI document). */
  observeJson?: (answer: { method: string; route: string | null; status: number; body: unknown }) => void
}

/** Builds the Express app without listening, so tests can drive it through supertest. */
export function createApp(ctx: AppContext, options: AppOptions = {}): Express {
  const { config, logger } = ctx
  const app = express()
  app.disable('x-powered-by')
  app.set('trust proxy', trustProxy(config.TRUST_PROXY))
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          styleSrc: ["'self'", "'unsafe-inline'"],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          upgradeInsecureRequests: null,
        },
      },
      strictTransportSecurity: config.COOKIE_SECURE,
    }),
  )
  app.use((req, res, next) => {
    const started = process.hrtime.bigint()
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6
      // Requests made with a personal API token name it, so its use can be followed in the log.
      logger.info({ method: req.method, url: req.originalUrl, status: res.statusCode, ms: Math.round(ms), ...(req.apiToken ? { token: req.apiToken.id, user: req.apiToken.userId } : {}) }, 'request')
    })
    next()
  })

  const store = new SequelizeStore({
    db: ctx.sequelize,
    table: 'Session',
    checkExpirationInterval: 15 * 60_000,
    extendDefaultFields: (defaults: { data: string; expires: Date }, sess: { passport?: { user?: number } }) => ({
      data: defaults.data,
      expires: defaults.expires,
      userId: sess.passport?.user ?? null,
    }),
  })
  if (config.NODE_ENV === 'test') store.stopExpiringSessions()
  // The session row's expiry moves with the last-seen time (sessionLifetime writes it at most once a
  // minute); touching the row on every other request would be a write per GET.
  store.touch = (_sid: string, _session: unknown, callback?: (err?: unknown) => void) => callback?.()
  // Every signed-in request reads its session row: one prepared statement, where the store's findOne
  // builds a model instance each time.
  store.get = (sid: string, callback: (err: unknown, session?: session.SessionData | null) => void) => {
    selectRows<{ data: string }>(ctx.sequelize, 'SELECT data FROM sessions WHERE sid = ?', [sid])
      .then(([row]) => (row ? (JSON.parse(row.data) as session.SessionData) : null))
      .then(
        (found) => callback(null, found),
        (err: unknown) => callback(err),
      )
  }

  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      verifyCredentials(email, password, config.BCRYPT_ROUNDS).then(
        (result) => ('user' in result ? done(null, result.user) : done(null, false, { message: result.reason, reason: result.reason } as never)),
        done,
      )
    }),
  )
  passport.serializeUser((user, done) => done(null, (user as User).id))
  passport.deserializeUser((id: number, done) => {
    // A deactivated account is signed out on its next request.
    User.findByPk(id).then((u) => done(null, u && u.active ? u : false), done)
  })

  const api = express.Router()
  const observe = options.observeJson
  if (observe) {
    api.use((req, res, next) => {
      const json = res.json.bind(res)
      res.json = (body: unknown) => {
        observe({ method: req.method.toLowerCase(), route: (req.route as { path?: string } | undefined)?.path ?? null, status: res.statusCode, body })
        return json(body)
      }
      next()
    })
  }
  api.use(express.json({ limit: '1mb' }))
  // A personal API token signs the request in by itself: no session, no session lifetime, no CSRF token.
  api.use(bearerAuth)
  api.use(
    unlessBearer(
      session({
        name: 'lw.sid',
        secret: config.SESSION_SECRET,
        store,
        resave: false,
        saveUninitialized: false,
        rolling: true,
        cookie: { httpOnly: true, sameSite: 'lax', secure: config.COOKIE_SECURE, maxAge: config.SESSION_IDLE_MINUTES * 60_000, path: '/' },
      }),
    ),
  )
  api.use(passport.initialize())
  api.use(unlessBearer(passport.session()))
  api.use(unlessBearer(sessionLifetime(config.SESSION_IDLE_MINUTES * 60_000, config.SESSION_ABSOLUTE_HOURS * 3600_000)))
  const limited = (limit: number, key: (req: express.Request) => string, skip: (req: express.Request) => boolean) =>
    rateLimit({
      windowMs: 60_000,
      limit,
      standardHeaders: 'draft-7',
      legacyHeaders: false,
      keyGenerator: key,
      // Uploads are limited by bytes and files per person instead (uploadBudget), so a pipeline may batch as it likes.
      skip: (req) => skip(req) || (req.method === 'POST' && req.path === '/spectra'),
      handler: () => {
        throw new HttpError(429, 'rate_limited', 'Too many requests; slow down and try again in a minute.')
      },
    })
  // Browsers are counted by address; each token has its own budget, so one pipeline cannot starve the office.
  api.use(
    limited(
      config.API_RATE_PER_MINUTE,
      (req) => ipKeyGenerator(req.ip ?? ''),
      (req) => req.apiToken !== undefined,
    ),
  )
  api.use(
    limited(
      config.API_TOKEN_RATE_PER_MINUTE,
      (req) => `token:${req.apiToken?.id}`,
      (req) => req.apiToken === undefined,
    ),
  )
  api.use(unlessBearer(csrfProtection))
  for (const route of apiRoutes(ctx)) api[route.method](route.path, requireAccess(route.access), ...route.before, route.handler)
  api.use(apiNotFound)
  app.use('/api', api)

  const clientDir = options.clientDir ? resolve(options.clientDir) : null
  if (clientDir && existsSync(join(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }))
    app.get(/^(?!\/api\/).*/, (_req, res) => res.sendFile(join(clientDir, 'index.html')))
  }
  app.use(errorHandler(logger, config.NODE_ENV === 'production', config.DB_RETRY_AFTER_SECONDS))
  return app
}
