import type { QueryInterface } from 'sequelize'
import * as m0001 from './0001-foundation'

export interface Migration {
  name: string
  up: (params: { context: QueryInterface }) => Promise<void>
  down: (params: { context: QueryInterface }) => Promise<void>
}

/** Every migration, in order. A new one is a new file plus a line here. */
export const migrations: Migration[] = [{ name: '0001-foundation', ...m0001 }]
