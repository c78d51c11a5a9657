import { defineConfig } from 'drizzle-kit'

// Migrations are generated from server/db/schema.ts and schema-planning.ts with `npm run db:generate` and applied
// at start-up by server/db/migrate.ts. `drizzle-kit push` is not used (it misreads MariaDB).
export default defineConfig({
  dialect: 'mysql',
  schema: ['./server/db/schema.ts', './server/db/schema-planning.ts', './server/db/schema-terrain.ts'],
  out: './drizzle',
  dbCredentials: { url: process.env.DATABASE_URL ?? 'mysql://skyfurrow@127.0.0.1:3307/skyfurrow' },
})
