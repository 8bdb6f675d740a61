import type { Sequelize } from 'sequelize'
import { SequelizeStorage, Umzug } from 'umzug'
import { migrations } from '../migrations'

export function createMigrator(sequelize: Sequelize) {
  return new Umzug({
    migrations,
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  })
}

/** Applies every pending migration; returns the names applied. */
export async function migrateUp(sequelize: Sequelize): Promise<string[]> {
  const applied = await createMigrator(sequelize).up()
  return applied.map((m) => m.name)
}
