import { Sequelize } from 'sequelize'
import type { Config } from '../config'
import { initModels } from '../models'

/**
 * Opens the MariaDB connection pool and, unless told otherwise, registers every model on it.
 * Models are module-wide classes, so a process has one model-bearing connection at a time.
 */
export function createSequelize(config: Config, options: { models?: boolean } = {}): Sequelize {
  const sequelize = new Sequelize(config.DB_NAME, config.DB_USER, config.DB_PASSWORD, {
    host: config.DB_HOST,
    port: config.DB_PORT,
    dialect: 'mariadb',
    logging: false,
    pool: { max: config.DB_POOL_MAX, min: 0, idle: 10_000 },
    dialectOptions: { connectTimeout: 10_000 },
    timezone: '+00:00',
    define: { underscored: true },
  })
  if (options.models !== false) initModels(sequelize)
  return sequelize
}
