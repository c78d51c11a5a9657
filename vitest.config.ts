import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vitest/config'

// Unit, API and browser tests. API and browser tests use the real MariaDB test database
// that `npm test` prepares (see server/setup/test.mjs); they run one file at a time.
export default defineConfig({
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  test: {
    include: ['tests/**/*.test.ts'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 120_000,
    fileParallelism: false,
    pool: 'forks',
  },
})
