// The jobs API and the runner's rules on the test database: a newer recompute supersedes
// the queued one, the list and summary show status and progress, a failing job is retried
// with backoff and then stays failed with its error, and a clean stop puts running jobs
// back in the queue.
import type { AddressInfo } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { FieldForecastResponse } from '../../shared/schemas/forecast.ts'
import type { Job, JobList, JobSummary } from '../../shared/schemas/jobs.ts'
import { createStore, type Store } from '../../server/db/repositories/index.ts'
import { EnginePool } from '../../server/jobs/enginePool.ts'
import { enqueueJob } from '../../server/queue/enqueue.ts'
import { orbitFeedHandler } from '../../server/jobs/handlers.ts'
import { JobRunner, type JobHandler } from '../../server/jobs/runner.ts'
import { createLogger } from '../../server/logger.ts'
import { ensureForecastFields } from '../support/forecastFields.ts'
import { demo, signIn, startTestServer, type Client, type TestServer } from '../support/server.ts'

let server: TestServer
let store: Store
let office: Client
let contractor: Client
let clientNorth: Client
let fieldId: number
const pool = new EnginePool(1)
const KIND = `test-api-${process.pid}`

beforeAll(async () => {
  server = await startTestServer()
  store = createStore(server.database.db)
  ;[fieldId] = await ensureForecastFields(server.database.db, 1)
  office = await signIn(server.app, demo.office)
  contractor = await signIn(server.app, demo.contractor)
  clientNorth = await signIn(server.app, demo.clientNorth)
})

afterAll(async () => {
  await pool.close()
  await server?.close()
})

function runner(handlers: Record<string, JobHandler>, overrides: Partial<ConstructorParameters<typeof JobRunner>[0]> = {}) {
  return new JobRunner({
    store,
    config: { ...server.config, jobConcurrency: 2 },
    logger: createLogger('error'),
    pool,
    handlers,
    retryBaseMs: 30,
    maxRetryDelayMs: 200,
    pollMs: 25,
    ...overrides,
  })
}

describe('recompute requests', () => {
  it('a newer request supersedes the queued one; the forecast shows the pending job', async () => {
    const first = (await contractor.post(`/api/fields/${fieldId}/recompute`)).body as Job
    const second = (await office.post(`/api/fields/${fieldId}/recompute`)).body as Job
    expect(second.id).toBeGreaterThan(first.id)
    const superseded = (await office.get('/api/jobs?status=superseded&limit=500')).body as JobList
    expect(superseded.items.map((j) => j.id)).toContain(first.id)
    const queued = (await office.get(`/api/jobs?status=queued&fieldId=${fieldId}`)).body as JobList
    expect(queued.items.map((j) => j.id)).toEqual([second.id])
    expect(queued.items[0]).toMatchObject({ reason: 'manual', createdByName: 'Priya Castellanos', fieldName: expect.any(String), farmName: expect.any(String) })
    const fc = (await office.get(`/api/fields/${fieldId}/forecast`)).body as FieldForecastResponse
    expect(fc.stale).toBe(true)
    expect(fc.pendingJob).toEqual({ id: second.id, status: 'queued', progress: 0 })
    const summary = (await clientNorth.get('/api/jobs/summary')).body as JobSummary
    expect(summary.active).toBe(true)
    expect(summary.queued).toBeGreaterThanOrEqual(1)
    expect(summary.progress).toBeGreaterThanOrEqual(0)
    expect(summary.progress).toBeLessThan(1)
  })

  it('refuses a bad filter naming it, and the list to roles other than office and admin', async () => {
    const bad = await office.get('/api/jobs?status=sleeping')
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.status).toMatch(/queued, running/)
    expect((await contractor.get('/api/jobs')).status).toBe(403)
    expect((await clientNorth.get('/api/jobs')).status).toBe(403)
  })
})

describe('the runner', () => {
  it('retries a failing job with backoff, then keeps it failed with the error', async () => {
    const kind = `${KIND}-flaky`
    let calls = 0
    const times: number[] = []
    const r = runner({
      [kind]: async () => {
        calls++
        times.push(Date.now())
        throw new Error(`the orbit feed answered 503 (call ${calls})`)
      },
    })
    const { job } = await enqueueJob(store, { kind, payload: {}, maxAttempts: 3 }, 'supersede')
    await r.start()
    const end = Date.now() + 10_000
    let row = await server.repos.jobs.findById(job.id)
    while (row?.status !== 'failed' && Date.now() < end) {
      await new Promise((res) => setTimeout(res, 30))
      row = await server.repos.jobs.findById(job.id)
    }
    await r.stop()
    expect(row).toMatchObject({ status: 'failed', attempts: 3, error: 'the orbit feed answered 503 (call 3)' })
    expect(calls).toBe(3)
    // The second wait is about twice the first (30 ms, then 60 ms).
    expect(times[1] - times[0]).toBeGreaterThanOrEqual(30)
    expect(times[2] - times[1]).toBeGreaterThanOrEqual(60)
    const listed = ((await office.get(`/api/jobs?status=failed&kind=forecast`)).body as JobList).items
    expect(listed.every((j) => j.kind === 'forecast')).toBe(true)
  })

  it('runs queued jobs back to back, without waiting for the next poll between them', async () => {
    const kind = `${KIND}-chain`
    const ran: number[] = []
    // One at a time and a poll interval far longer than the test: only the runner's own
    // wake-up after each job can start the next one.
    const r = runner(
      {
        [kind]: async (ctx) => {
          ran.push(ctx.job.id)
          return { summary: 'ok' }
        },
      },
      { pollMs: 600_000, config: { ...server.config, jobConcurrency: 1 } },
    )
    const ids: number[] = []
    for (let i = 0; i < 4; i++) ids.push((await enqueueJob(store, { kind, payload: { i } }, 'supersede')).job.id)
    const started = Date.now()
    await r.start()
    const end = Date.now() + 5_000
    while (ran.length < ids.length && Date.now() < end) await new Promise((res) => setTimeout(res, 20))
    await r.stop()
    expect(ran).toEqual(ids)
    expect(Date.now() - started).toBeLessThan(5_000)
  })

  it('writes progress while a job runs and marks it done with a summary', async () => {
    const kind = `${KIND}-steps`
    const seen: number[] = []
    let release!: () => void
    const gate = new Promise<void>((res) => (release = res))
    const r = runner({
      [kind]: async (ctx) => {
        ctx.progress(0.4)
        await gate
        ctx.progress(0.9)
        return { summary: 'three steps done' }
      },
    }, { heartbeatMs: 20 })
    const { job } = await enqueueJob(store, { kind, payload: {} }, 'supersede')
    await r.start()
    const end = Date.now() + 5_000
    while (Date.now() < end) {
      const row = await server.repos.jobs.findById(job.id)
      if (row?.status === 'running' && row.progress > 0) {
        seen.push(row.progress)
        break
      }
      await new Promise((res) => setTimeout(res, 20))
    }
    release()
    await r.idle()
    await r.stop()
    expect(seen[0]).toBeCloseTo(0.4)
    const done = await server.repos.jobs.findById(job.id)
    expect(done).toMatchObject({ status: 'done', progress: 1, lockedBy: null })
    expect(JSON.parse(done!.resultJson!).summary).toBe('three steps done')
  })

  it('a clean stop puts a running job back in the queue without counting the attempt', async () => {
    const kind = `${KIND}-long`
    let started!: () => void
    const running = new Promise<void>((res) => (started = res))
    const r = runner({
      [kind]: (ctx) =>
        new Promise((_, reject) => {
          started()
          ctx.signal.addEventListener('abort', () => reject(ctx.signal.reason))
        }),
    })
    const { job } = await enqueueJob(store, { kind, payload: {} }, 'supersede')
    await r.start()
    await running
    await r.stop()
    const row = await server.repos.jobs.findById(job.id)
    expect(row).toMatchObject({ status: 'queued', attempts: 0, lockedBy: null })
    // Clean up: finish it with a handler that succeeds.
    const r2 = runner({ [kind]: async () => ({ summary: 'ok' }) })
    await r2.start()
    await r2.idle()
    await r2.stop()
    const final = await server.repos.jobs.findById(job.id)
    expect(final?.status, JSON.stringify({ ...final, r2: r2.id })).toBe('done')
  })

  it('fetches the orbit feed (the local fake feed of this app) in an orbit-feed job', async () => {
    const http = server.app.listen(0, '127.0.0.1')
    await new Promise((res) => http.once('listening', res))
    const publicUrl = `http://127.0.0.1:${(http.address() as AddressInfo).port}`
    try {
      const r = runner({ 'orbit-feed': orbitFeedHandler }, { config: { ...server.config, publicUrl, orbitFeedUrl: '', jobConcurrency: 1 } })
      const { job } = await enqueueJob(store, { kind: 'orbit-feed', payload: { reason: 'test' } }, 'supersede')
      await r.start()
      await r.idle()
      await r.stop()
      const row = await server.repos.jobs.findById(job.id)
      expect(row?.status, row?.error ?? '').toBe('done')
      const result = JSON.parse(row!.resultJson!) as { ok: boolean; satelliteCount: number; summary: string }
      expect(result.ok).toBe(true)
      expect(result.satelliteCount).toBeGreaterThan(90)
      expect(result.summary).toMatch(/^Fetched \d+ satellites/)
    } finally {
      await new Promise((res) => http.close(res))
    }
  })
})
