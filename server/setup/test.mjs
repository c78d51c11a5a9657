// `npm test`: the same set-up as `npm start`, against a fresh, separate test database,
// then type-check, lint, the import rules, unit and API tests (real MariaDB) and browser tests (chromium).
// Extra arguments are passed to Vitest, e.g. `npm test -- tests/api`.
import { bin, ensureChromium, ensurePackages, log, run, startDatabase } from './lib.mjs'

const started = Date.now()
const vitestArgs = process.argv.slice(2)
ensurePackages()
ensureChromium()
const name = process.env.SKYFURROW_TEST_DB ?? 'skyfurrow_test'
const db = await startDatabase(name, { fresh: true })
const env = { ...process.env, DATABASE_URL: db.url, NODE_ENV: 'test', SKYFURROW_TEST_DB: name }
let failed = false
try {
  const step = (title, command, args) => {
    log(title)
    run(command, args, { env })
  }
  step('migrating the test database', bin('tsx'), ['server/db/migrate.ts'])
  step('seeding the test database with the demo scenario', bin('tsx'), ['seed/index.ts'])
  if (vitestArgs.length === 0) {
    step('type-checking', bin('vue-tsc'), ['--build', '--force'])
    step('linting', bin('eslint'), ['.', '--max-warnings=0'])
    step('checking imports (no cycles, services never import jobs)', bin('depcruise'), ['server', 'shared', 'src', 'seed', 'tests', '--config', '.dependency-cruiser.cjs'])
  }
  step('building the client for the browser tests', bin('vite'), ['build', '--logLevel', 'warn'])
  step('running the tests', bin('vitest'), ['run', ...vitestArgs])
} catch (error) {
  console.error(`[skyfurrow] ${error.message}`)
  failed = true
} finally {
  await db.stop()
}
log(`${failed ? 'FAILED' : 'passed'} after ${((Date.now() - started) / 1000).toFixed(0)} s`)
process.exit(failed ? 1 : 0)
