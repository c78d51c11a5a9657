// All repositories over one Drizzle handle, and a Store that runs work in a transaction.
import { sql } from 'drizzle-orm'
import type { Database, DbOrTx } from '../index.ts'
import { auditRepository } from './audit.ts'
import { isDuplicateKey, UniqueViolation } from './util.ts'
import { businessRepository } from './business.ts'
import { farmsRepository } from './farms.ts'
import { fieldsRepository } from './fields.ts'
import { obstructionsRepository } from './obstructions.ts'
import { orbitsRepository } from './orbits.ts'
import { outagesRepository } from './outages.ts'
import { mailboxRepository } from './mailbox.ts'
import { forecastsRepository } from './forecasts.ts'
import { passesRepository } from './passes.ts'
import { plansRepository } from './plans.ts'
import { calendarTokensRepository } from './calendarTokens.ts'
import { jobsRepository } from './jobs.ts'
import { storageRepository } from './storage.ts'
import { machinesRepository } from './machines.ts'
import { serviceLevelsRepository } from './serviceLevels.ts'
import { workTypesRepository } from './workTypes.ts'
import { sessionsRepository } from './sessions.ts'
import { tokensRepository } from './tokens.ts'
import { terrainRepository } from './terrain.ts'
import { usersRepository } from './users.ts'
import { correctionsRepository } from './corrections.ts'

export function createRepositories(db: DbOrTx) {
  return {
    users: usersRepository(db),
    farms: farmsRepository(db),
    sessions: sessionsRepository(db),
    tokens: tokensRepository(db),
    mailbox: mailboxRepository(db),
    business: businessRepository(db),
    serviceLevels: serviceLevelsRepository(db),
    workTypes: workTypesRepository(db),
    machines: machinesRepository(db),
    jobs: jobsRepository(db),
    storage: storageRepository(db),
    forecasts: forecastsRepository(db),
    passes: passesRepository(db),
    plans: plansRepository(db),
    calendarTokens: calendarTokensRepository(db),
    fields: fieldsRepository(db),
    obstructions: obstructionsRepository(db),
    orbits: orbitsRepository(db),
    outages: outagesRepository(db),
    terrain: terrainRepository(db),
    audit: auditRepository(db),
    corrections: correctionsRepository(db),
  }
}
export type Repositories = ReturnType<typeof createRepositories>
export { UniqueViolation }

/** What services receive: repositories, transactions and a liveness check. */
export interface Store {
  repos: Repositories
  /**
   * Runs `work` in one transaction: everything it writes is kept, or nothing. A write
   * that would repeat a unique key fails the transaction with a UniqueViolation.
   */
  transaction<T>(work: (repos: Repositories) => Promise<T>): Promise<T>
  ping(): Promise<void>
}

export function createStore(db: Database): Store {
  return {
    repos: createRepositories(db),
    transaction: (work) =>
      db.transaction((tx) => work(createRepositories(tx))).catch((error: unknown) => {
        throw isDuplicateKey(error) ? new UniqueViolation(error) : error
      }),
    ping: async () => {
      await db.execute(sql`SELECT 1`)
    },
  }
}
