// `tsx server/db/migrate-cli.ts up [--seed] | down`
import { loadConfig } from '../config'
import { createSequelize } from './index'
import { createMigrator } from './migrate'
import { DEMO_PEOPLE, seedDemo } from './seed'

let config
try {
  config = loadConfig()
} catch (error) {
  console.error(error instanceof Error ? error.message : error)
  process.exit(1)
}
const sequelize = createSequelize(config)
const [command = 'up', ...flags] = process.argv.slice(2)
try {
  const migrator = createMigrator(sequelize)
  if (command === 'up') {
    const applied = await migrator.up()
    console.log(applied.length ? `[lineweight] migrations applied: ${applied.map((m) => m.name).join(', ')}` : '[lineweight] database schema is up to date')
    if (flags.includes('--seed')) {
      const seeded = await seedDemo(sequelize, config)
      if (seeded) console.log('[lineweight] demo scenario seeded')
    }
    if (flags.includes('--print-sign-ins')) {
      for (const p of DEMO_PEOPLE) console.log(`SIGN-IN ${p.role.padEnd(11)} ${p.email.padEnd(36)} ${p.password}`)
    }
  } else if (command === 'down') {
    await migrator.down()
  } else {
    throw new Error(`unknown command ${command}: use up or down`)
  }
} catch (error) {
  console.error(error instanceof Error ? error.message : error)
  process.exitCode = 1
} finally {
  await sequelize.close()
}
