// `tsx seed/index.ts`: writes the demo scenario (seed/scenario.ts) through the repositories.
// Idempotent: does nothing when the database already has users; otherwise writes everything
// in one transaction, so a failure leaves the database empty rather than half-seeded.
import { fileURLToPath } from 'node:url'
import { hashPassword } from '../server/auth/password.ts'
import { loadConfig } from '../server/config.ts'
import { openDatabase, type Database } from '../server/db/index.ts'
import { createStore } from '../server/db/repositories/index.ts'
import { seedOperators } from './crew.ts'
import { seedCorrections } from './corrections.ts'
import { seedFields } from './fields.ts'
import { seedPasses } from './passes.ts'
import { seedPlanning } from './planning.ts'
import { seedHillFarm } from './terrain.ts'
import { DEMO_PASSWORD, demoBusinessName, demoConstellations, demoFarms, demoUsers } from './scenario.ts'

export interface SeedResult {
  seeded: boolean
  users: number
  farms: number
}

export async function seedDemo(db: Database): Promise<SeedResult> {
  // Service levels, work types and machines first: fields and passes refer to them.
  await seedPlanning(db)
  const result = await seedPeopleAndFarms(db)
  // The demo crew member runs the machines whose crew names them (the cab view).
  await seedOperators(db)
  // The demo farms' fields and obstructions (each farm only while it has none).
  await seedFields(db)
  // The hill-country farm with its elevation model (written with the first seed only).
  if (result.seeded) await seedHillFarm(db)
  // RTK base stations and the correction network the fields reach.
  await seedCorrections(db)
  // Last: demo passes in the coming days on those fields (only while none is upcoming).
  await seedPasses(db)
  return result
}

async function seedPeopleAndFarms(db: Database): Promise<SeedResult> {
  const store = createStore(db)
  if ((await store.repos.users.count()) > 0) return { seeded: false, users: 0, farms: 0 }
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  return store.transaction(async (repos) => {
    if ((await repos.users.count()) > 0) return { seeded: false, users: 0, farms: 0 }
    await repos.business.setName(demoBusinessName)
    const farmIds = new Map<string, number>()
    for (const farm of demoFarms) {
      const { key, ...fields } = farm
      farmIds.set(key, await repos.farms.insert(fields))
    }
    for (const user of demoUsers) {
      const id = await repos.users.insert({
        email: user.email,
        name: user.name,
        role: user.role,
        units: user.units,
        passwordHash,
      })
      await repos.users.setFarmIds(
        id,
        user.farms.map((key) => farmIds.get(key)!),
      )
    }
    // The demo contractor's RTK receivers track GPS and GLONASS only, so the vertical work
    // types open and close through the day; the office can switch Galileo and BeiDou on
    // in Orbits and see the week clear up.
    for (const { system, enabled } of demoConstellations) await repos.orbits.upsertActive({ system, orbitSetId: null, enabled })
    return { seeded: true, users: demoUsers.length, farms: demoFarms.length }
  })
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const config = loadConfig()
  const handle = openDatabase(config.databaseUrl, { connectionLimit: 2 })
  try {
    const result = await seedDemo(handle.db)
    console.log(
      result.seeded
        ? `[skyfurrow] demo scenario written: ${result.users} users, ${result.farms} farms (password ${DEMO_PASSWORD})`
        : '[skyfurrow] the database already has users; demo seed skipped',
    )
  } catch (error) {
    console.error('[skyfurrow] seeding failed:', error instanceof Error ? error.message : error)
    process.exitCode = 1
  } finally {
    await handle.close()
  }
}
