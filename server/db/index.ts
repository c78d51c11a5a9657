// The MariaDB connection pool and the Drizzle instance over it.
import mysql from 'mysql2/promise'
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2'
import * as schema from './schema.ts'

export type Database = MySql2Database<typeof schema>
/** A Drizzle handle: the database itself or an open transaction. */
export type DbOrTx = Database | Parameters<Parameters<Database['transaction']>[0]>[0]

export interface DatabaseHandle {
  db: Database
  pool: mysql.Pool
  close(): Promise<void>
}

export function openDatabase(url: string, options: { connectionLimit?: number } = {}): DatabaseHandle {
  const pool = mysql.createPool({
    uri: url,
    connectionLimit: options.connectionLimit ?? 10,
    timezone: 'Z',
    charset: 'utf8mb4_unicode_ci',
    connectTimeout: 5_000,
    enableKeepAlive: true,
  })
  const db = drizzle(pool, { schema, mode: 'default' })
  let closed = false
  return {
    db,
    pool,
    close: async () => {
      if (closed) return
      closed = true
      await pool.end()
    },
  }
}
