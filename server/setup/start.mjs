// `npm start`: everything from a fresh machine to a running Skyfurrow.
// Installs what is missing, starts the private MariaDB, migrates, seeds the demo when the
// database is empty, builds the client and serves it with the API. Ctrl-C stops the
// server and the private MariaDB cleanly; the data stays in .data/ for the next start.
import { spawn } from 'node:child_process'
import { bin, ensurePackages, log, root, run, startDatabase } from './lib.mjs'

const started = Date.now()
ensurePackages()
const db = await startDatabase(process.env.SKYFURROW_DB_NAME ?? 'skyfurrow')
const env = { ...process.env, DATABASE_URL: db.url, NODE_ENV: process.env.NODE_ENV ?? 'development' }
try {
  log('applying database migrations')
  run(bin('tsx'), ['server/db/migrate.ts'], { env })
  log('seeding the demo scenario (only into an empty database)')
  run(bin('tsx'), ['seed/index.ts'], { env })
  log('building the client')
  run(bin('vite'), ['build', '--logLevel', 'warn'], { env })
} catch (error) {
  console.error(`[skyfurrow] set-up failed: ${error.message}`)
  await db.stop()
  process.exit(1)
}

const host = process.env.HOST ?? '127.0.0.1'
const port = process.env.PORT ?? '3000'
const server = spawn(bin('tsx'), ['server/index.ts'], { cwd: root, env, stdio: ['ignore', 'pipe', 'inherit'] })
server.stdout.on('data', (chunk) => {
  process.stdout.write(chunk)
  if (String(chunk).includes('Skyfurrow listening on')) {
    const url = (String(chunk).match(/https?:\/\/\S+/) ?? [`http://${host}:${port}`])[0]
    console.log(`
  Skyfurrow is ready at ${url}  (set-up took ${((Date.now() - started) / 1000).toFixed(0)} s)

  Demo sign-ins (password for all: skyfurrow-demo)
    admin@demo.skyfurrow.test          admin
    office@demo.skyfurrow.test         office
    crew@demo.skyfurrow.test           contractor
    client.north@demo.skyfurrow.test   farm client
    client.south@demo.skyfurrow.test   farm client

  Press Ctrl-C to stop.
`)
  }
})

let stopping = false
async function stop(signal) {
  if (stopping) return
  stopping = true
  log(`stopping (${signal})`)
  if (server.exitCode === null) server.kill('SIGTERM')
}
process.on('SIGINT', () => stop('SIGINT'))
process.on('SIGTERM', () => stop('SIGTERM'))
server.on('exit', async (code) => {
  await db.stop()
  process.exit(stopping ? 0 : (code ?? 1))
})
