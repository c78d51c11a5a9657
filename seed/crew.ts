// Which demo user runs which demo machine (the cab view shows a user's machines' passes):
// each machine whose crew names a demo user gets that user as its operator. Invented like
// the rest of the scenario. Idempotent: a machine that already has an operator keeps it.
import type { Database } from '../server/db/index.ts'
import { createStore } from '../server/db/repositories/index.ts'
import { demoUsers } from './scenario.ts'

export async function seedOperators(db: Database): Promise<number> {
  const store = createStore(db)
  return store.transaction(async (repos) => {
    let linked = 0
    for (const machine of await repos.machines.list()) {
      if (machine.operatorUserId !== null) continue
      const demo = demoUsers.find((u) => u.role !== 'client' && machine.crew === u.name)
      const user = demo ? await repos.users.findByEmail(demo.email) : null
      if (!user) continue
      await repos.machines.update(machine.id, { operatorUserId: user.id })
      linked++
    }
    return linked
  })
}
