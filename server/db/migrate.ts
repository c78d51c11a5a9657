// `tsx server/db/migrate.ts`: applies the generated migrations in drizzle/ to DATABASE_URL.
import { fileURLToPath } from 'node:url'
import { migrate } from 'drizzle-orm/mysql2/migrator'
import { loadConfig } from '../config.ts'
import { openDatabase, type Database } from './index.ts'

export const migrationsFolder = fileURLToPath(new URL('../../drizzle', import.meta.url))

export async function runMigrations(db: Database): Promise<void> {
  await migrate(db, { migrationsFolder })
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const config = loadConfig()
  const handle = openDatabase(config.databaseUrl, { connectionLimit: 1 })
  try {
    await runMigrations(handle.db)
    console.log('[skyfurrow] database migrations are up to date')
  } catch (error) {
    console.error('[skyfurrow] migration failed:', error instanceof Error ? error.message : error)
    process.exitCode = 1
  } finally {
    await handle.close()
  }
}
