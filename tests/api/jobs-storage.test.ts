// The storage section of the Jobs page: GET /api/jobs/storage reports every table of the
// database with its size (information_schema, as MariaDB counts it) and the pruning rules
// of the nightly refresh; office and admin only.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { forecastWindow } from '../../shared/schemas/forecast.ts'
import type { StorageReport } from '../../shared/schemas/jobs.ts'
import { FINISHED_JOB_RETENTION_DAYS } from '../../server/queue/retention.ts'
import { demo, signIn, startTestServer, type Client, type TestServer } from '../support/server.ts'

let server: TestServer
let office: Client
let admin: Client

beforeAll(async () => {
  server = await startTestServer()
  office = await signIn(server.app, demo.office)
  admin = await signIn(server.app, demo.admin)
})

afterAll(async () => {
  await server?.close()
})

describe('GET /api/jobs/storage', () => {
  it('lists the tables with their rows and bytes, largest first, and the pruning rules', async () => {
    // Fresh statistics, so that the estimate of a small table is its count.
    await server.database.pool.query('ANALYZE TABLE users, farms')
    const res = await office.get('/api/jobs/storage')
    expect(res.status).toBe(200)
    const report = res.body as StorageReport
    const names = report.tables.map((t) => t.name)
    for (const table of ['forecast_hours', 'field_forecasts', 'jobs', 'fields', 'users']) expect(names).toContain(table)
    expect(names.some((n) => n.startsWith('__drizzle'))).toBe(false)
    const sizes = report.tables.map((t) => t.dataBytes + t.indexBytes)
    expect(sizes).toEqual([...sizes].sort((a, b) => b - a))
    expect(report.totalBytes).toBe(sizes.reduce((a, b) => a + b, 0))
    // Every InnoDB table holds at least one 16 kB page (MariaDB Knowledge Base, "InnoDB Page Size").
    for (const t of report.tables) expect(t.dataBytes).toBeGreaterThanOrEqual(16_384)
    const [[users]] = (await server.database.pool.query('SELECT COUNT(*) AS n FROM users')) as unknown as [[{ n: number }]]
    expect(report.tables.find((t) => t.name === 'users')?.rowsApprox).toBe(Number(users.n))
    expect(report.jobRetentionDays).toBe(FINISHED_JOB_RETENTION_DAYS)
    // Hours are pruned from before the earliest farm's week (each farm's starts at its own midnight).
    const [zones] = (await server.database.pool.query('SELECT DISTINCT time_zone AS zone FROM farms')) as unknown as [Array<{ zone: string }>]
    const earliest = Math.min(...zones.map((z) => forecastWindow(Date.now(), z.zone).startMs))
    expect(report.windowStart).toBe(new Date(earliest).toISOString())
    expect((await admin.get('/api/jobs/storage')).status).toBe(200)
  })

  it('is refused to crews and farm clients with a sentence', async () => {
    for (const email of [demo.contractor, demo.clientNorth]) {
      const res = await (await signIn(server.app, email)).get('/api/jobs/storage')
      expect(res.status).toBe(403)
      expect(typeof res.body.error.message).toBe('string')
    }
  })
})
