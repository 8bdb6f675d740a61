import type { QueryInterface } from 'sequelize'
import * as m0001 from './0001-foundation'
import * as m0002 from './0002-spectra'
import * as m0003 from './0003-measurements'
import * as m0004 from './0004-standards-suggestions'
import * as m0006 from './0006-review'
import * as m0007 from './0007-releases'
import * as m0008 from './0008-observed-standards'
import * as m0009 from './0009-workflow'
import * as m0010 from './0010-reading-corrections'
import * as m0012 from './0012-stored-files-and-leases'
import * as m0013 from './0013-instruments'
import * as m0014 from './0014-instrument-standards'
import * as m0020 from './0020-lists-at-scale'
import * as m0030 from './0030-api-tokens'
import * as m0031 from './0031-audit-index'
import * as m0032 from './0032-audit-covering'

export interface Migration {
  name: string
  up: (params: { context: QueryInterface }) => Promise<void>
  down: (params: { context: QueryInterface }) => Promise<void>
}

/** Every migration, in order. A new one is a new file plus a line here. */
export const migrations: Migration[] = [
  { name: '0001-foundation', ...m0001 },
  { name: '0002-spectra', ...m0002 },
  { name: '0003-measurements', ...m0003 },
  { name: '0004-standards-suggestions', ...m0004 },
  { name: '0006-review', ...m0006 },
  { name: '0007-releases', ...m0007 },
  { name: '0008-observed-standards', ...m0008 },
  { name: '0009-workflow', ...m0009 },
  { name: '0010-reading-corrections', ...m0010 },
  { name: '0012-stored-files-and-leases', ...m0012 },
  { name: '0013-instruments', ...m0013 },
  { name: '0014-instrument-standards', ...m0014 },
  { name: '0020-lists-at-scale', ...m0020 },
  { name: '0030-api-tokens', ...m0030 },
  { name: '0031-audit-index', ...m0031 },
  { name: '0032-audit-covering', ...m0032 },
]
