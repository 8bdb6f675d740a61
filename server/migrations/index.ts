import type { QueryInterface } from 'sequelize'
import * as m0001 from './0001-foundation'
import * as m0002 from './0002-spectra'

export interface Migration {
  name: string
  up: (params: { context: QueryInterface }) => Promise<void>
  down: (params: { context: QueryInterface }) => Promise<void>
}

/** Every migration, in order. A new one is a new file plus a line here. */
export const migrations: Migration[] = [
  { name: '0001-foundation', ...m0001 },
  { name: '0002-spectra', ...m0002 },
]
