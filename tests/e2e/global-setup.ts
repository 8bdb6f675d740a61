import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { setTimeout as sleep } from 'node:timers/promises'
import type { TestProject } from 'vitest/node'
import { Sequelize } from 'sequelize'
import { SERVER_NODE_FLAGS } from '../../scripts/lib/setup.mjs'

const E2E_DB = 'lineweight_e2e'

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
  }
}

/** Serves the built client and API over a fresh demo database, as `npm start` would. */
export default async function setup(project: TestProject) {
  const port = process.env.E2E_PORT ?? '8091'
  const env: NodeJS.ProcessEnv = { ...process.env, DB_NAME: E2E_DB, PORT: port, SMTP_PORT: '0', LOG_LEVEL: 'warn', NODE_ENV: 'production' }
  const admin = new Sequelize('', env.DB_USER!, env.DB_PASSWORD!, { host: env.DB_HOST, port: Number(env.DB_PORT), dialect: 'mariadb', logging: false })
  await admin.query(`DROP DATABASE IF EXISTS \`${E2E_DB}\``)
  await admin.query(`CREATE DATABASE \`${E2E_DB}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`)
  await admin.close()
  const migrate = spawnSync('node_modules/.bin/tsx', ['server/db/migrate-cli.ts', 'up', '--seed'], { env, encoding: 'utf8' })
  if (migrate.status !== 0) throw new Error(`seeding the browser-test database failed:\n${migrate.stderr}`)

  const server: ChildProcess = spawn('node_modules/.bin/tsx', [...SERVER_NODE_FLAGS, 'server/index.ts'], { env, detached: true, stdio: ['ignore', 'inherit', 'inherit'] })
  const baseUrl = `http://127.0.0.1:${port}`
  for (let i = 0; ; i++) {
    if (server.exitCode !== null) throw new Error(`the server exited with ${server.exitCode}`)
    try {
      const res = await fetch(`${baseUrl}/api/health`)
      if (res.ok) break
    } catch {
      // not listening yet
    }
    if (i > 300) throw new Error('the server did not start within 30 s')
    await sleep(100)
  }
  project.provide('baseUrl', baseUrl)
  return async () => {
    // The server runs in its own process group; stop the whole group.
    if (server.pid && server.exitCode === null) {
      process.kill(-server.pid, 'SIGTERM')
      await new Promise((r) => server.once('exit', r))
    }
  }
}
