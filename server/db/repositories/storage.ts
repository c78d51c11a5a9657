// The size of the stored tables, from MariaDB's information_schema (TABLE_ROWS is an
// estimate for InnoDB; DATA_LENGTH and INDEX_LENGTH are the bytes of the clustered index
// and of the other indexes: MariaDB Knowledge Base, "Information Schema TABLES Table").
import { sql } from 'drizzle-orm'
import type { StoredTable } from '../../../shared/schemas/jobs.ts'
import type { DbOrTx } from '../index.ts'

export function storageRepository(db: DbOrTx) {
  return {
    /** Tables of this database, largest first (the migrations' own bookkeeping left out). */
    async tables(): Promise<StoredTable[]> {
      const [rows] = (await db.execute(sql`
        SELECT TABLE_NAME AS name, COALESCE(TABLE_ROWS, 0) AS rowsApprox,
          COALESCE(DATA_LENGTH, 0) AS dataBytes, COALESCE(INDEX_LENGTH, 0) AS indexBytes
        FROM information_schema.TABLES
        WHERE TABLE_SCHEMA = DATABASE() AND TABLE_TYPE = 'BASE TABLE' AND TABLE_NAME NOT LIKE '__drizzle%'
        ORDER BY DATA_LENGTH + INDEX_LENGTH DESC, TABLE_NAME`)) as unknown as [
        Array<{ name: string; rowsApprox: number | string; dataBytes: number | string; indexBytes: number | string }>,
      ]
      return rows.map((r) => ({ name: r.name, rowsApprox: Number(r.rowsApprox), dataBytes: Number(r.dataBytes), indexBytes: Number(r.indexBytes) }))
    },
  }
}
