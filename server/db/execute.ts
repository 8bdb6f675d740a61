import { UniqueConstraintError, type Model, type ModelStatic, type Sequelize, type Transaction } from 'sequelize'
import { sqlTime } from '../lib/sql-time'

/**
 * Runs one statement on the transaction's own connection through the driver's binary protocol
 * (a prepared statement): buffers travel as raw bytes, where Sequelize's text protocol escapes
 * them byte by byte on both ends (about 3× the CPU for an 80 KB array). Also skips building a
 * model instance, for inserts that need only the new id.
 */
export async function executeInTransaction(transaction: Transaction, sql: string, values: unknown[]): Promise<{ insertId: number; affectedRows: number }> {
  const result = (await connectionOf(transaction).execute(sql, values)) as { insertId: number | bigint; affectedRows: number }
  return { insertId: Number(result.insertId), affectedRows: Number(result.affectedRows) }
}

/** Runs one SELECT on the transaction's own connection through the binary protocol; its rows as plain objects. */
export async function selectInTransaction<T>(transaction: Transaction, sql: string, values: unknown[]): Promise<T[]> {
  return Array.from((await connectionOf(transaction).execute(sql, values)) as T[])
}

/** The mariadb driver's connection, as far as these helpers use it. */
export interface DriverConnection {
  execute(sql: string, values: unknown[]): Promise<unknown>
  query(options: object, values: object): Promise<unknown>
}

/** Runs `work` on a driver connection taken from Sequelize's pool, and gives it back. */
export async function onPooledConnection<T>(sequelize: Sequelize, work: (connection: DriverConnection) => Promise<T>): Promise<T> {
  const manager = sequelize.connectionManager as unknown as { getConnection(options: object): Promise<DriverConnection>; releaseConnection(connection: DriverConnection): void }
  const connection = await manager.getConnection({ type: 'read' })
  try {
    return await work(connection)
  } finally {
    manager.releaseConnection(connection)
  }
}

/**
 * Runs one SELECT on a pooled connection through the binary protocol; its rows as plain objects,
 * with no query building and no model instances (for statements run on every request).
 */
export async function selectRows<T>(sequelize: Sequelize, sql: string, values: unknown[]): Promise<T[]> {
  return onPooledConnection(sequelize, async (connection) => Array.from((await connection.execute(sql, values)) as T[]))
}

/** The driver connection a Sequelize transaction holds. */
const connectionOf = (transaction: Transaction) => (transaction as unknown as { connection: DriverConnection }).connection

interface Column {
  attribute: string
  field: string
  fallback: unknown
  stamp: boolean
}
const columnsOf = new WeakMap<ModelStatic<Model>, Column[]>()

/** A model's columns as an insert writes them: its field names, plain default values, and its timestamps. */
function modelColumns(model: ModelStatic<Model>): Column[] {
  let columns = columnsOf.get(model)
  if (!columns) {
    const o = model.options
    const stamps = new Set<string>()
    if (o.timestamps !== false && o.createdAt !== false) stamps.add('createdAt')
    if (o.timestamps !== false && o.updatedAt !== false) stamps.add('updatedAt')
    columns = Object.entries(model.getAttributes())
      .filter(([, a]) => !a.autoIncrement)
      .map(([attribute, a]) => {
        const fallback = a.defaultValue
        if (fallback !== undefined && fallback !== null && typeof fallback === 'object') throw new Error(`${model.name}.${attribute} has a computed default; insertModelRow writes plain values only`)
        return { attribute, field: a.field ?? attribute, fallback, stamp: stamps.has(attribute) }
      })
    columnsOf.set(model, columns)
  }
  return columns
}

/**
 * Inserts one row of a model on the transaction's connection through the binary protocol, with the
 * model's defaults and timestamps, and returns its id: Model.create costs several times the insert
 * (an instance, hooks, validation, a deep copy of its options) on a path taken for every upload.
 * A duplicate key is raised as Sequelize's UniqueConstraintError, as Model.create raises it.
 */
export async function insertModelRow(transaction: Transaction, model: ModelStatic<Model>, values: Record<string, unknown>): Promise<number> {
  const now = sqlTime(new Date())
  const fields: string[] = []
  const params: unknown[] = []
  for (const c of modelColumns(model)) {
    let v = c.stamp ? now : c.attribute in values ? values[c.attribute] : c.fallback
    if (v === undefined) continue
    if (v instanceof Date) v = sqlTime(v)
    else if (typeof v === 'boolean') v = v ? 1 : 0
    fields.push(c.field)
    params.push(v)
  }
  const sql = `INSERT INTO ${model.getTableName() as string} (${fields.join(', ')}) VALUES (${fields.map(() => '?').join(', ')})`
  try {
    return (await executeInTransaction(transaction, sql, params)).insertId
  } catch (error) {
    if ((error as { errno?: number }).errno === 1062) throw new UniqueConstraintError({ message: (error as Error).message, parent: Object.assign(error as Error, { sql }) })
    throw error
  }
}
