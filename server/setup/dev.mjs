// `npm run dev`: private MariaDB, migrations and demo seed, then the API server with
// reload (tsx watch) and the Vite dev server with hot module replacement on :5173.
import { spawn } from 'node:child_process'
import { bin, ensurePackages, log, root, run, startDatabase } from './lib.mjs'

ensurePackages()
const db = await startDatabase(process.env.SKYFURROW_DB_NAME ?? 'skyfurrow')
const env = { ...process.env, DATABASE_URL: db.url, NODE_ENV: 'development', PUBLIC_URL: 'http://127.0.0.1:5173' }
run(bin('tsx'), ['server/db/migrate.ts'], { env })
run(bin('tsx'), ['seed/index.ts'], { env })
const children = [
  spawn(bin('tsx'), ['watch', 'server/index.ts'], { cwd: root, env, stdio: 'inherit' }),
  spawn(bin('vite'), [], { cwd: root, env, stdio: 'inherit' }),
]
log('open http://127.0.0.1:5173 (API on :3000)')
const stop = () => {
  for (const child of children) child.kill('SIGTERM')
  setTimeout(async () => {
    await db.stop()
    process.exit(0)
  }, 1500)
}
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
