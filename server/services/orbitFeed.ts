// The orbit feed: an address serving OMM JSON (or TLE / OMM XML) that is fetched into a new
// orbit set of source 'feed' (daily by the job queue, or now by office staff). By default
// (ORBIT_FEED_URL empty) the address is the app's own local fake feed,
// GET /api/orbit-feed/nominal.json, which serves the nominal constellations as OMM mean
// elements with today's epoch, so the same fetch path runs offline and in tests.
//
// Constellations whose active orbit data is a feed set roll forward to each new feed set;
// the office opts in once by choosing a feed set on the Orbits page.
import {
  gmstRad,
  nominalConstellation,
  constants,
  type KeplerOrbit,
  type Satellite,
} from '../../shared/precision/index.ts'
import type { GnssSystem, OrbitFeedStatus } from '../../shared/schemas/orbits.ts'
import type { Config } from '../config.ts'
import type { Database } from '../db/index.ts'
import { createRepositories, type Repositories, type Store } from '../db/repositories/index.ts'
import { emit } from '../events.ts'
import { HttpError } from '../http/errors.ts'
import { MB } from '../imports/upload.ts'
import type { ServiceContext } from './context.ts'
import { resolveActive } from './orbitData.ts'
import { insertOrbitSet, readOrbitFile } from './orbits.ts'

/** Path of the local fake feed under the app's public address. */
export const LOCAL_FEED_PATH = '/api/orbit-feed/nominal.json'

/** Feed sets kept besides the active ones; older ones are removed after each fetch. */
export const FEED_SETS_KEPT = 14

const FEED_MAX_BYTES = 10 * MB
const DAY_MS = 86_400_000

// ---- the local fake feed ---------------------------------------------------------------

/** Invented catalogue numbers of the fake feed (not used by any real object list we ship). */
const FAKE_CATALOG_BASE = 95001

function fakeObjectName(s: Satellite): string {
  // The engine tells the constellation from these names (GPS, GLONASS, GALILEO, BEIDOU).
  if (s.system === 'GPS') return `GPS BASELINE ${s.id.slice(1)}`
  if (s.id.startsWith('CG')) return `BEIDOU GEO ${s.id.slice(2)}`
  if (s.id.startsWith('CI')) return `BEIDOU IGSO ${s.id.slice(2)}`
  return `${s.system.toUpperCase()} WALKER ${s.id.slice(1)}`
}

/**
 * The nominal constellations as CCSDS OMM mean elements (JSON) at an epoch of 00:00 UTC of
 * the day of `nowMs`. Circular Keplerian slots are turned into SGP4 elements: right
 * ascension of the node = earth-fixed node longitude + GMST at the epoch, mean anomaly =
 * argument of latitude (argument of perigee 0), mean motion in revolutions per day; a
 * small eccentricity (1e-4) keeps SGP4 away from its e = 0 special cases. Positions agree
 * with the nominal Keplerian ones to within about 100 km over three days (checked in the
 * tests), plenty for a stand-in feed.
 */
export function nominalFeedOmm(nowMs: number): object[] {
  const { RAD } = constants
  const wrap = (d: number) => ((d % 360) + 360) % 360
  const epochMs = Math.floor(nowMs / DAY_MS) * DAY_MS
  const epoch = new Date(epochMs).toISOString().replace('Z', '')
  return nominalConstellation('all').map((s, k) => {
    const o = s.orbit as KeplerOrbit
    const tk = (epochMs - o.tRefMs) / 1000
    return {
      OBJECT_NAME: fakeObjectName(s),
      OBJECT_ID: `NOMINAL-${s.id}`,
      CENTER_NAME: 'EARTH',
      REF_FRAME: 'TEME',
      TIME_SYSTEM: 'UTC',
      MEAN_ELEMENT_THEORY: 'SGP4',
      EPOCH: epoch,
      MEAN_MOTION: Number(((o.nRadS * 86400) / (2 * Math.PI)).toFixed(8)),
      ECCENTRICITY: 0.0001,
      INCLINATION: Number((o.iRad * RAD).toFixed(4)),
      RA_OF_ASC_NODE: Number(wrap((o.lon0Rad + o.lonRateRadS * tk + gmstRad(epochMs)) * RAD).toFixed(4)),
      ARG_OF_PERICENTER: 0,
      MEAN_ANOMALY: Number(wrap((o.m0Rad + o.nRadS * tk) * RAD).toFixed(4)),
      EPHEMERIS_TYPE: 0,
      CLASSIFICATION_TYPE: 'U',
      NORAD_CAT_ID: FAKE_CATALOG_BASE + k,
      ELEMENT_SET_NO: 999,
      REV_AT_EPOCH: 0,
      BSTAR: 0,
      MEAN_MOTION_DOT: 0,
      MEAN_MOTION_DDOT: 0,
    }
  })
}

/** The feed address in use: ORBIT_FEED_URL, or the app's own local fake feed. */
export function feedUrlOf(config: Pick<Config, 'orbitFeedUrl' | 'publicUrl'>): string {
  return config.orbitFeedUrl || `${config.publicUrl}${LOCAL_FEED_PATH}`
}

// ---- fetching ----------------------------------------------------------------------------

export type OrbitFeedResult =
  | {
      ok: true
      url: string
      attempts: number
      orbitSetId: number
      name: string
      satelliteCount: number
      skippedCount: number
      /** Constellations whose active data rolled forward to this set. */
      switched: GnssSystem[]
      message: string
    }
  | { ok: false; url: string; attempts: number; error: string; message: string }

export interface FetchOrbitFeedOptions {
  /** Per attempt (default 10 s). */
  timeoutMs?: number
  /** Retries after the first attempt (default 3). */
  retries?: number
  /** Wait before retry k (1-based) is backoffMs * 2^(k-1) (default 1 s: 1, 2, 4 s). */
  backoffMs?: number
  fetchImpl?: typeof fetch
  nowMs?: number
  createdBy?: number | null
}

class PermanentFeedError extends Error {}

async function readLimited(res: Response): Promise<Buffer> {
  const declared = Number(res.headers.get('content-length') ?? 0)
  if (declared > FEED_MAX_BYTES) throw new PermanentFeedError(`the feed answered with ${Math.round(declared / MB)} MB, more than ${FEED_MAX_BYTES / MB} MB`)
  if (!res.body) return Buffer.alloc(0)
  const chunks: Buffer[] = []
  let size = 0
  const reader = res.body.getReader()
  for (;;) {
    const { done, value } = await reader.read()
    if (done) break
    size += value.length
    if (size > FEED_MAX_BYTES) {
      await reader.cancel()
      throw new PermanentFeedError(`the feed answered with more than ${FEED_MAX_BYTES / MB} MB`)
    }
    chunks.push(Buffer.from(value))
  }
  return Buffer.concat(chunks)
}

async function fetchOnce(url: string, timeoutMs: number, fetchImpl: typeof fetch): Promise<Buffer> {
  const controller = new AbortController()
  const timer = setTimeout(() => controller.abort(), timeoutMs)
  try {
    const res = await fetchImpl(url, { signal: controller.signal, headers: { accept: 'application/json, text/plain, application/xml;q=0.9, */*;q=0.5' }, redirect: 'follow' })
    if (!res.ok) {
      await res.body?.cancel().catch(() => undefined)
      const msg = `the feed answered HTTP ${res.status}${res.statusText ? ` ${res.statusText}` : ''}`
      if (res.status >= 400 && res.status < 500 && res.status !== 408 && res.status !== 429) throw new PermanentFeedError(msg)
      throw new Error(msg)
    }
    return await readLimited(res)
  } catch (error) {
    if (controller.signal.aborted) throw new Error(`no answer within ${Math.round(timeoutMs / 100) / 10} s`)
    if (error instanceof PermanentFeedError) throw error
    const cause = (error as { cause?: { code?: string; message?: string } }).cause
    const why = cause?.code ?? cause?.message
    // An unknown host name is a configuration mistake, not a passing fault: no retries.
    if (cause?.code === 'ENOTFOUND') throw new PermanentFeedError(`no such host (${hostOf(url)})`)
    throw new Error(why ? `cannot reach the feed (${why})` : error instanceof Error ? error.message : String(error))
  } finally {
    clearTimeout(timer)
  }
}

function toRepos(source: Database | Store | Repositories): { repos: Repositories; transaction: Store['transaction'] } {
  if ('repos' in source && 'transaction' in source) return { repos: (source as Store).repos, transaction: (source as Store).transaction }
  if ('orbits' in source) {
    const repos = source as Repositories
    return { repos, transaction: (work) => work(repos) }
  }
  const db = source as Database
  return { repos: createRepositories(db), transaction: (work) => db.transaction((tx) => work(createRepositories(tx))) }
}

const hostOf = (url: string) => {
  try {
    return new URL(url).host
  } catch {
    return url
  }
}

/**
 * Fetches the orbit feed at `url` into a new orbit set (source 'feed'): each attempt times
 * out after 10 s; network errors, timeouts, HTTP 5xx/408/429 are retried 3 times with
 * backoff (1, 2, 4 s); other HTTP errors and unreadable content fail at once. On success
 * the constellations whose active data is a feed set roll forward to the new set, old
 * feed sets beyond the newest 14 (and not active) are removed, and 'orbits.changed' is
 * emitted. Never throws for a feed problem: the result says what happened.
 *
 * Accepts the Drizzle database, a Store or Repositories. The jobs engineer's daily job
 * calls it with `feedUrlOf(config)` and stores the result in its job row (kind
 * 'orbit-feed': result_json = JSON of the result, status 'failed' and `error` when !ok);
 * GET /api/orbit-feed/status reads the newest such row.
 *
 * @example
 * const result = await fetchOrbitFeed(db, feedUrlOf(config))
 * if (!result.ok) logger.warn(result.message)
 */
export async function fetchOrbitFeed(
  source: Database | Store | Repositories,
  url: string,
  options: FetchOrbitFeedOptions = {},
): Promise<OrbitFeedResult> {
  const { timeoutMs = 10_000, retries = 3, backoffMs = 1000, fetchImpl = fetch } = options
  const nowMs = options.nowMs ?? Date.now()
  const { transaction } = toRepos(source)
  let attempts = 0
  let body: Buffer | null = null
  let lastError = ''
  for (let attempt = 0; attempt <= retries; attempt++) {
    if (attempt > 0) await new Promise((r) => setTimeout(r, backoffMs * 2 ** (attempt - 1)))
    attempts++
    try {
      body = await fetchOnce(url, timeoutMs, fetchImpl)
      break
    } catch (error) {
      lastError = error instanceof Error ? error.message : String(error)
      if (error instanceof PermanentFeedError) break
    }
  }
  const fail = (error: string): OrbitFeedResult => ({
    ok: false,
    url,
    attempts,
    error,
    message: `The orbit feed at ${hostOf(url)} failed after ${attempts} attempt${attempts === 1 ? '' : 's'}: ${error}.`,
  })
  if (!body) return fail(lastError)

  let parsed
  try {
    parsed = readOrbitFile(body, null, nowMs, 'The feed')
  } catch (error) {
    return fail(error instanceof Error ? error.message.replace(/\.$/, '') : String(error))
  }
  const local = url.endsWith(LOCAL_FEED_PATH)
  const stamp = new Date(nowMs).toISOString().slice(0, 16).replace('T', ' ')
  const name = `${local ? 'Local nominal feed' : `Feed ${hostOf(url)}`} ${stamp} UTC`.slice(0, 160)
  const stored = await transaction(async (repos) => {
    const orbitSetId = await insertOrbitSet(repos, { name, source: 'feed', content: body.toString('utf8'), parsed, uploadedBy: options.createdBy ?? null })
    await repos.orbits.lockActiveRows()
    const choices = resolveActive(await repos.orbits.activeRows())
    const setIds = [...new Set(choices.map((c) => c.orbitSetId).filter((id): id is number => id !== null))]
    const feedSetIds = new Set((await repos.orbits.findSets(setIds)).filter((s) => s.source === 'feed').map((s) => s.id))
    const systemsInNew = new Set(parsed.rows.map((r) => r.system))
    const switched: GnssSystem[] = []
    for (const c of choices) {
      if (c.orbitSetId !== null && feedSetIds.has(c.orbitSetId) && systemsInNew.has(c.system)) {
        await repos.orbits.upsertActive({ system: c.system, orbitSetId, enabled: c.enabled })
        switched.push(c.system)
      }
    }
    // Keep the newest feed sets and every set still in use.
    const inUse = new Set(resolveActive(await repos.orbits.activeRows()).map((c) => c.orbitSetId))
    const feeds = (await repos.orbits.listSets()).filter((s) => s.source === 'feed')
    for (const old of feeds.slice(FEED_SETS_KEPT)) if (!inUse.has(old.id)) await repos.orbits.deleteSet(old.id)
    return { orbitSetId, switched }
  })
  void emit('orbits.changed', { reason: `orbit feed fetched into set ${stored.orbitSetId}` })
  const skipped = parsed.report.problems.length
  return {
    ok: true,
    url,
    attempts,
    orbitSetId: stored.orbitSetId,
    name,
    satelliteCount: parsed.rows.length,
    skippedCount: skipped,
    switched: stored.switched,
    message: `Fetched ${parsed.rows.length} satellites${skipped ? ` (${skipped} records skipped)` : ''} into "${name}"${stored.switched.length ? `; now used for ${stored.switched.join(', ')}` : ''}.`,
  }
}

// ---- the service behind /api/orbit-feed -------------------------------------------------

export function createOrbitFeedService(ctx: ServiceContext) {
  const { store, config } = ctx
  return {
    url: () => feedUrlOf(config),

    /** Runs the feed now, recorded as a job row of kind 'orbit-feed'; 502 when it fails. */
    async run(userId: number, options: FetchOrbitFeedOptions = {}): Promise<OrbitFeedResult> {
      const url = feedUrlOf(config)
      const jobId = await store.repos.orbits.startFeedRun(url, userId)
      let result: OrbitFeedResult
      try {
        result = await fetchOrbitFeed(store, url, { ...options, createdBy: userId })
      } catch (error) {
        result = { ok: false, url, attempts: 1, error: error instanceof Error ? error.message : String(error), message: 'The orbit feed run failed.' }
      }
      await store.repos.orbits.finishFeedRun(jobId, { ok: result.ok, error: result.ok ? null : result.message, resultJson: JSON.stringify(result) })
      if (!result.ok) throw new HttpError(502, 'feed_failed', result.message)
      return result
    },

    async status(): Promise<OrbitFeedStatus> {
      const last = await store.repos.orbits.lastFeedRun()
      const newest = await store.repos.orbits.newestFeedSet()
      let lastRun: OrbitFeedStatus['lastRun'] = null
      if (last) {
        let parsed: Partial<OrbitFeedResult> & { summary?: string } = {}
        try {
          const raw = last.resultJson ? (JSON.parse(last.resultJson) as Record<string, unknown>) : {}
          // Rows of the run-now endpoint hold the result itself; job-queue rows wrap it as
          // { summary, data: result }.
          const inner = raw.data && typeof raw.data === 'object' ? (raw.data as Record<string, unknown>) : raw
          parsed = { ...(inner as Partial<OrbitFeedResult>), summary: typeof raw.summary === 'string' ? raw.summary : undefined }
        } catch {
          parsed = {}
        }
        const ok = typeof parsed.ok === 'boolean' ? parsed.ok : last.status === 'done'
        lastRun = {
          at: (last.finishedAt ?? last.updatedAt).toISOString(),
          ok,
          message: (ok ? (parsed.message ?? parsed.summary) : (last.error ?? parsed.message)) ?? (ok ? 'Fetched.' : 'Failed.'),
          orbitSetId: parsed.ok ? (parsed.orbitSetId ?? null) : null,
          attempts: parsed.attempts ?? last.attempts,
        }
      }
      return {
        url: config.orbitFeedUrl,
        usesLocalFake: !config.orbitFeedUrl,
        lastRun,
        newestFeedSet: newest
          ? { id: newest.id, name: newest.name, createdAt: newest.createdAt.toISOString(), satelliteCount: newest.satelliteCount }
          : null,
      }
    },
  }
}
export type OrbitFeedService = ReturnType<typeof createOrbitFeedService>
