// A transaction that would repeat a unique key fails with the store's own UniqueViolation
// (services turn it into 409), not with the database driver's error; other errors pass
// through unchanged.
import { describe, expect, it } from 'vitest'
import { createStore, UniqueViolation } from '../../../server/db/repositories/index.ts'
import type { Database } from '../../../server/db/index.ts'

/** A database handle whose transaction fails with `error` (the shape mysql2 and Drizzle give). */
function failingDatabase(error: unknown): Database {
  return { transaction: async () => Promise.reject(error) } as unknown as Database
}

describe('store transactions and unique keys', () => {
  it("turns MariaDB's duplicate-key error, also wrapped by Drizzle, into a UniqueViolation", async () => {
    const driverError = Object.assign(new Error("Duplicate entry 'North 40' for key 'fields_farm_name'"), { code: 'ER_DUP_ENTRY', errno: 1062 })
    const wrapped = new Error('Failed query', { cause: driverError })
    for (const error of [driverError, wrapped]) {
      const failure = await createStore(failingDatabase(error)).transaction(async () => 1).catch((e: unknown) => e)
      expect(failure).toBeInstanceOf(UniqueViolation)
      expect((failure as Error).cause).toBe(error)
    }
  })

  it('passes any other error through as it is', async () => {
    const deadlock = Object.assign(new Error('Deadlock found'), { code: 'ER_LOCK_DEADLOCK' })
    const failure = await createStore(failingDatabase(deadlock)).transaction(async () => 1).catch((e: unknown) => e)
    expect(failure).toBe(deadlock)
  })
})
