// Job rows on the real MariaDB (DATABASE_URL): two claimers on two connection pools never
// take the same job, superseding and the other enqueue modes, one running job per key,
// requeueing what a dead process left, and a stored forecast never overwritten by an
// older job's result.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type DatabaseHandle } from '../../../server/db/index.ts'
import { runMigrations } from '../../../server/db/migrate.ts'
import { createStore, type Store } from '../../../server/db/repositories/index.ts'
import { jobs } from '../../../server/db/schema-planning.ts'
import { enqueueJob } from '../../../server/queue/enqueue.ts'
import { toStoredHour } from '../../../server/forecast/storedHour.ts'
import { seedDemo } from '../../../seed/index.ts'
import { ensureForecastFields } from '../../support/forecastFields.ts'
import { inArray, like } from 'drizzle-orm'

let a: DatabaseHandle
let b: DatabaseHandle
let storeA: Store
let storeB: Store
const KIND = `test-claim-${process.pid}`

beforeAll(async () => {
  if (!process.env.DATABASE_URL) throw new Error('These tests need DATABASE_URL (a migrated test database).')
  a = openDatabase(process.env.DATABASE_URL, { connectionLimit: 4 })
  b = openDatabase(process.env.DATABASE_URL, { connectionLimit: 4 })
  await runMigrations(a.db)
  await seedDemo(a.db)
  storeA = createStore(a.db)
  storeB = createStore(b.db)
})

afterAll(async () => {
  await a?.db.delete(jobs).where(like(jobs.kind, `${KIND}%`))
  await a?.close()
  await b?.close()
})

describe('claiming', () => {
  it('two claimers on two connection pools never get the same job', async () => {
    const ids: number[] = []
    for (let i = 0; i < 40; i++) ids.push((await enqueueJob(storeA, { kind: KIND, payload: { i } }, 'supersede')).job.id)
    const claimedBy = new Map<number, string>()
    const duplicates: number[] = []
    async function claimer(store: Store, name: string) {
      for (;;) {
        const job = await store.transaction((repos) => repos.jobs.claimNext(`${name}:1:x`, [KIND]))
        if (!job) return
        if (claimedBy.has(job.id)) duplicates.push(job.id)
        claimedBy.set(job.id, name)
        // Hold the job a moment, like a real run, before the next claim.
        await new Promise((r) => setTimeout(r, Math.random() * 3))
      }
    }
    await Promise.all([claimer(storeA, 'host-a'), claimer(storeB, 'host-b'), claimer(storeA, 'host-a2'), claimer(storeB, 'host-b2')])
    expect(duplicates).toEqual([])
    expect([...claimedBy.keys()].sort((x, y) => x - y)).toEqual(ids)
    // Both pools took part.
    const names = new Set(claimedBy.values())
    expect(names.size).toBeGreaterThanOrEqual(2)
    const rows = await a.db.select().from(jobs).where(inArray(jobs.id, ids))
    expect(rows.every((r) => r.status === 'running' && r.attempts === 1 && r.lockedBy === `${claimedBy.get(r.id)}:1:x`)).toBe(true)
  })

  it('does not start a second job of a key while one runs', async () => {
    const kind = `${KIND}-key`
    const first = await enqueueJob(storeA, { kind, dedupeKey: `${kind}:1`, payload: {} }, 'supersede')
    const claimed = await storeA.transaction((r) => r.jobs.claimNext('w1:1:x', [kind]))
    expect(claimed?.id).toBe(first.job.id)
    const second = await enqueueJob(storeA, { kind, dedupeKey: `${kind}:1`, payload: {} }, 'supersede')
    expect(second.created).toBe(true)
    expect(await storeB.transaction((r) => r.jobs.claimNext('w2:1:x', [kind]))).toBeNull()
    expect(await storeA.repos.jobs.complete(first.job.id, 'w1:1:x', { resultJson: '{}' })).toBe(true)
    const next = await storeB.transaction((r) => r.jobs.claimNext('w2:1:x', [kind]))
    expect(next?.id).toBe(second.job.id)
  })
})

describe('claim order', () => {
  it('takes a due job of no field (a delivery, a feed) before older field recomputes', async () => {
    const [fieldId] = await ensureForecastFields(a.db, 1)
    const kind = `${KIND}-order`
    const older: number[] = []
    for (let i = 0; i < 3; i++) older.push((await enqueueJob(storeA, { kind, fieldId, payload: { i } }, 'supersede')).job.id)
    const delivery = (await enqueueJob(storeA, { kind: `${kind}-mail`, payload: {} }, 'supersede')).job
    const kinds = [kind, `${kind}-mail`]
    expect((await storeA.transaction((r) => r.jobs.claimNext('w1:1:x', kinds)))?.id).toBe(delivery.id)
    // Then the field jobs, oldest first.
    for (const id of older) expect((await storeA.transaction((r) => r.jobs.claimNext('w1:1:x', kinds)))?.id).toBe(id)
    expect(await storeA.transaction((r) => r.jobs.claimNext('w1:1:x', kinds))).toBeNull()
  })
})

describe('enqueue modes', () => {
  it('supersede marks the queued job of the key superseded', async () => {
    const kind = `${KIND}-sup`
    const one = await enqueueJob(storeA, { kind, dedupeKey: `${kind}:7`, payload: { n: 1 } }, 'supersede')
    const two = await enqueueJob(storeB, { kind, dedupeKey: `${kind}:7`, payload: { n: 2 } }, 'supersede')
    expect(two.created).toBe(true)
    expect((await storeA.repos.jobs.findById(one.job.id))?.status).toBe('superseded')
    expect((await storeA.repos.jobs.findById(two.job.id))?.status).toBe('queued')
  })

  it('concurrent supersedes of one key leave exactly one queued job', async () => {
    const kind = `${KIND}-race`
    const results = await Promise.all(
      Array.from({ length: 8 }, (_, i) => enqueueJob(i % 2 ? storeA : storeB, { kind, dedupeKey: `${kind}:1`, payload: { i } }, 'supersede')),
    )
    const rows = await a.db.select().from(jobs).where(inArray(jobs.id, results.map((r) => r.job.id)))
    expect(rows.filter((r) => r.status === 'queued')).toHaveLength(1)
    expect(rows.filter((r) => r.status === 'superseded')).toHaveLength(7)
  })

  it('reuse-pending returns the queued job; once adds a key only one time', async () => {
    const kind = `${KIND}-reuse`
    const one = await enqueueJob(storeA, { kind, dedupeKey: `${kind}:1`, payload: {} }, 'reuse-pending')
    const two = await enqueueJob(storeB, { kind, dedupeKey: `${kind}:1`, payload: {} }, 'reuse-pending')
    expect(two.created).toBe(false)
    expect(two.job.id).toBe(one.job.id)
    const onceKind = `${KIND}-once`
    const all = await Promise.all([1, 2, 3, 4].map((i) => enqueueJob(i % 2 ? storeA : storeB, { kind: onceKind, dedupeKey: `${onceKind}:2026-12-02`, payload: {} }, 'once')))
    expect(all.filter((r) => r.created)).toHaveLength(1)
    expect(new Set(all.map((r) => r.job.id)).size).toBe(1)
  })
})

describe('abandoned jobs', () => {
  it('are queued again, or failed once their attempts are used up; a live lock is kept', async () => {
    const kind = `${KIND}-dead`
    const j1 = (await enqueueJob(storeA, { kind, payload: {} }, 'supersede')).job
    const j2 = (await enqueueJob(storeA, { kind, payload: {}, maxAttempts: 1 }, 'supersede')).job
    const c1 = await storeA.transaction((r) => r.jobs.claimNext('gone-host:1:x', [kind]))
    const c2 = await storeA.transaction((r) => r.jobs.claimNext('gone-host:1:x', [kind]))
    expect([c1?.id, c2?.id].sort()).toEqual([j1.id, j2.id].sort())
    const running = (await storeA.repos.jobs.running()).filter((r) => r.kind === kind)
    // Another process took over j1 meanwhile: its lock no longer matches, so it is left alone.
    const stale = running.map((r) => (r.id === j1.id ? { ...r, lockedBy: 'someone-else:2:y' } : r))
    expect(await storeA.repos.jobs.requeueAbandoned(stale)).toEqual({ requeued: 0, failed: 1 })
    expect(await storeA.repos.jobs.requeueAbandoned(running.filter((r) => r.id === j1.id))).toEqual({ requeued: 1, failed: 0 })
    const after1 = await storeA.repos.jobs.findById(j1.id)
    const after2 = await storeA.repos.jobs.findById(j2.id)
    expect(after1).toMatchObject({ status: 'queued', lockedBy: null, attempts: 1 })
    expect(after2?.status).toBe('failed')
    expect(after2?.error).toMatch(/server stopped/)
    // The heartbeat of a job that is no longer ours says so.
    expect(await storeA.repos.jobs.heartbeat(j1.id, 'gone-host:1:x', 0.5)).toBe(false)
  })
})

describe('stored forecast replacement', () => {
  it('keeps the newer job result and replaces the window whole', async () => {
    const [fieldId] = await ensureForecastFields(a.db, 1)
    const hour = (startMs: number) => ({
      time: new Date(startMs).toISOString(),
      startMs,
      samples: 10,
      noFixShare: 0,
      satellites: { min: 9, median: 11 },
      hdop: { median: 0.8, max: 1.1 },
      vdop: { median: 1.2, max: 1.6 },
      pdopMax: 2,
      n1HdopMax: 1.3,
      h95M: { median: 0.02, max: 0.026 },
      v95M: { median: 0.028, max: 0.037 },
      workTypes: [{ id: '1', share: 1, shareN1: 0.97, state: 'clear' as const }],
    })
    const H = 3_600_000
    const start = Date.UTC(2030, 0, 1)
    const rows = (jobId: number, from: number, n: number) =>
      Array.from({ length: n }, (_, i) =>
        toStoredHour(fieldId, hour(from + i * H), { jobId, inputsVersion: `v${jobId}`, orbitSummary: 'test', computedAt: new Date() }),
      )
    const store = (jobId: number, from: number, n: number) =>
      storeA.transaction((r) => r.forecasts.replaceField(fieldId, jobId, new Date(from), new Date(from + n * H), rows(jobId, from, n)))
    expect(await store(1_000_001, start, 6)).toBe('stored')
    // A newer job with the window moved on by 2 hours: old hours outside it go.
    expect(await store(1_000_005, start + 2 * H, 6)).toBe('stored')
    // An older job finishing late must not overwrite it.
    expect(await store(1_000_003, start, 6)).toBe('newer-stored')
    const meta = (await storeA.repos.forecasts.storedMeta([fieldId])).get(fieldId)!
    expect(meta.hours).toBe(6)
    expect(meta.firstHour?.getTime()).toBe(start + 2 * H)
    expect(meta.minVersion).toBe('v1000005')
    expect(meta.maxVersion).toBe('v1000005')
    const stored = await storeA.repos.forecasts.hours([fieldId], new Date(start), new Date(start + 10 * H))
    expect(JSON.parse(stored[0].workJson)).toEqual({ '1': { share: 1, shareN1: 0.97, state: 'clear' } })
    await storeA.repos.forecasts.pruneBefore(new Date(start + 100 * H))
  })
})
