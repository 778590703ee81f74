import mysql from 'mysql2/promise'
import { drizzle } from 'drizzle-orm/mysql2'
import * as schema from './schema'

/**
 * One drizzle instance on a mysql2 pool. The Nitro server wraps it in `useDb()`; the worker
 * and the scripts call it directly (they have no Nuxt auto-imports).
 */
export function createDb(url: string, connectionLimit = 10) {
  if (!url) throw new Error('NUXT_DATABASE_URL is not set')
  const pool = mysql.createPool({
    uri: url,
    connectionLimit,
    // Keep DATETIME/TIMESTAMP values in UTC whatever the server's zone.
    timezone: 'Z',
    enableKeepAlive: true,
  })
  const db = drizzle(pool, { schema, mode: 'default' })
  return { db, pool }
}

export type Db = ReturnType<typeof createDb>['db']
/** A transaction's handle, as `db.transaction` passes it. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
/** Either: for helpers that run alone or inside a caller's transaction. */
export type DbOrTx = Db | Tx
export { schema }

/** The id of the row an insert created (`$returningId()` types its rows as possibly absent). */
export function firstId(rows: { id: number }[]): number {
  const row = rows[0]
  if (!row) throw new Error('the insert returned no id')
  return row.id
}
