// `node server/setup/db.mjs [name] [--fresh]`: start the private MariaDB (kept running)
// and print the DATABASE_URL of database `name` (default skyfurrow). For development.
import { startDatabase } from './lib.mjs'

const args = process.argv.slice(2)
const name = args.find((a) => !a.startsWith('--')) ?? 'skyfurrow'
const { url } = await startDatabase(name, { fresh: args.includes('--fresh') })
console.log(url)
