// Space weather: the planetary K index (Kp) forecast in 3-hour blocks, fetched daily by a
// job from KP_FEED_URL, or by default from the app's own local fake feed
// (GET /api/space-weather/kp-forecast.json), whose days hold one geomagnetic storm day so
// the demo week shows what a storm does. Read on the NOAA G-scale (shared/precision/
// spaceWeather.ts). A feed older than 36 hours, or whose last fetch failed, is stale and is
// shown as stale, never as quiet.
//
// Feed format: a JSON array of { time_tag, kp } objects (time_tag the block start in UTC,
// "YYYY-MM-DD HH:MM:SS" or ISO 8601; kp a number or numeric text; optional observed:
// "observed" | "estimated" | "predicted"), or an array of arrays whose first row names the
// columns time_tag and kp. This follows the layout of NOAA SWPC's planetary K-index
// forecast JSON product (from memory; either layout is read). A feed with any unreadable
// row is refused whole: nothing is stored from it.
import { gScaleOfKp, STORM_G } from '../../shared/precision/index.ts'
import type { KpBlockView, SpaceWeatherState, SpaceWeatherStatus } from '../../shared/schemas/corrections.ts'
import type { Config } from '../config.ts'
import type { Store } from '../db/repositories/index.ts'
import { emit } from '../events.ts'
import { HttpError } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'

export const LOCAL_KP_FEED_PATH = '/api/space-weather/kp-forecast.json'
const HOUR_MS = 3_600_000
const DAY_MS = 24 * HOUR_MS
const BLOCK_MS = 3 * HOUR_MS
/** A feed not fetched for this long is stale. */
export const KP_STALE_MS = 36 * HOUR_MS
const FEED_MAX_BYTES = 2 * 1024 * 1024

export function kpFeedUrlOf(config: Pick<Config, 'kpFeedUrl' | 'publicUrl'>): string {
  return config.kpFeedUrl || `${config.publicUrl}${LOCAL_KP_FEED_PATH}`
}

/** Invented quiet-to-unsettled Kp pattern of the fake feed (eight blocks a day). */
const QUIET_DAYS = [
  [1.33, 1.67, 2, 2.33, 2.67, 2, 1.67, 1.33],
  [2, 2.33, 3, 3.67, 3.33, 2.67, 2.33, 2],
  [1.67, 2, 2.33, 2.67, 3, 2.33, 2, 1.67],
]
/** The storm day of the fake feed: G1 in the morning, G3 (Kp 7, 7+) over the afternoon. */
const STORM_DAY = [3, 4, 5.33, 6, 7, 7.33, 6.33, 5]

/**
 * The local fake feed: yesterday observed, today partly observed, and three days ahead
 * predicted; the day after tomorrow is the storm day.
 *
 * @example
 * fakeKpFeed(Date.UTC(2026, 11, 3, 10))[0] // -> { time_tag: '2026-12-02 00:00:00', kp: 1.33, observed: 'observed' }
 */
export function fakeKpFeed(nowMs: number): Array<{ time_tag: string; kp: number; observed: string }> {
  const today = Math.floor(nowMs / DAY_MS) * DAY_MS
  const out: Array<{ time_tag: string; kp: number; observed: string }> = []
  for (let d = -1; d <= 3; d++) {
    const day = today + d * DAY_MS
    const values = d === 2 ? STORM_DAY : QUIET_DAYS[(d + 3) % QUIET_DAYS.length]
    values.forEach((kp, b) => {
      const start = day + b * BLOCK_MS
      out.push({ time_tag: new Date(start).toISOString().slice(0, 19).replace('T', ' '), kp, observed: start + BLOCK_MS <= nowMs ? 'observed' : 'predicted' })
    })
  }
  return out
}

export interface ParsedKpBlock {
  blockStart: Date
  blockEnd: Date
  kp: number
  observed: boolean
}

function parseTime(v: unknown, row: number): Date {
  if (typeof v !== 'string' || !/^\d{4}-\d{2}-\d{2}[ T]\d{2}:\d{2}(:\d{2}(\.\d+)?)?Z?$/.test(v.trim())) {
    throw new Error(`row ${row}: time_tag ${JSON.stringify(v)} is not a UTC time like 2026-12-03 00:00:00`)
  }
  const t = v.trim().replace(' ', 'T')
  const ms = Date.parse(t.endsWith('Z') ? t : `${t}Z`)
  if (!Number.isFinite(ms)) throw new Error(`row ${row}: time_tag ${JSON.stringify(v)} is not a valid time`)
  return new Date(ms)
}

function parseKp(v: unknown, row: number): number {
  const n = typeof v === 'number' ? v : typeof v === 'string' && v.trim() !== '' ? Number(v) : NaN
  if (!Number.isFinite(n) || n < 0 || n > 9) throw new Error(`row ${row}: kp ${JSON.stringify(v)} is not a number from 0 to 9`)
  return n
}

/**
 * Reads a Kp feed body; throws an Error naming the first bad row. Blocks are 3 hours from
 * their time_tag; duplicates keep the last row (a forecast row after an observed one).
 */
export function parseKpFeed(text: string): ParsedKpBlock[] {
  let data: unknown
  try {
    data = JSON.parse(text)
  } catch {
    throw new Error('the feed is not JSON')
  }
  if (!Array.isArray(data) || data.length === 0) throw new Error('the feed is not a list of Kp blocks')
  let rows: Array<{ time_tag: unknown; kp: unknown; observed?: unknown }>
  let first = 1
  if (Array.isArray(data[0])) {
    const header = (data[0] as unknown[]).map((h) => String(h).toLowerCase())
    const ti = header.indexOf('time_tag')
    const ki = header.indexOf('kp')
    const oi = header.indexOf('observed')
    if (ti < 0 || ki < 0) throw new Error('the first row of the feed does not name the columns time_tag and kp')
    rows = data.slice(1).map((r, i) => {
      if (!Array.isArray(r)) throw new Error(`row ${i + 2}: not a list of values`)
      return { time_tag: r[ti], kp: r[ki], observed: oi >= 0 ? r[oi] : undefined }
    })
    first = 2
  } else {
    rows = data.map((r, i) => {
      if (!r || typeof r !== 'object') throw new Error(`row ${i + 1}: not an object with time_tag and kp`)
      return r as { time_tag: unknown; kp: unknown; observed?: unknown }
    })
  }
  if (rows.length === 0) throw new Error('the feed holds no Kp blocks')
  const byStart = new Map<number, ParsedKpBlock>()
  rows.forEach((r, i) => {
    const start = parseTime(r.time_tag, i + first)
    const kp = parseKp(r.kp, i + first)
    byStart.set(start.getTime(), { blockStart: start, blockEnd: new Date(start.getTime() + BLOCK_MS), kp, observed: r.observed === 'observed' })
  })
  return [...byStart.values()].sort((a, b) => a.blockStart.getTime() - b.blockStart.getTime())
}

export type KpFeedResult = { ok: true; url: string; blocks: number; stormDays: string[]; message: string } | { ok: false; url: string; error: string; message: string }

/**
 * Fetches the Kp feed and stores its blocks in one transaction (the blocks from its first
 * block on are replaced). A failure is recorded in the feed status and stores nothing.
 * Emits 'planning.changed' (every field re-forecast) when the stored blocks changed.
 */
export async function fetchKpFeed(store: Store, url: string, options: { fetchImpl?: typeof fetch; nowMs?: number; timeoutMs?: number } = {}): Promise<KpFeedResult> {
  const { fetchImpl = fetch, timeoutMs = 10_000 } = options
  const nowMs = options.nowMs ?? Date.now()
  const attemptAt = new Date(nowMs)
  let blocks: ParsedKpBlock[]
  try {
    const controller = new AbortController()
    const timer = setTimeout(() => controller.abort(), timeoutMs)
    let text: string
    try {
      const res = await fetchImpl(url, { signal: controller.signal, headers: { accept: 'application/json' } })
      if (!res.ok) throw new Error(`the feed answered HTTP ${res.status}`)
      text = await res.text()
    } catch (error) {
      if (controller.signal.aborted) throw new Error(`no answer within ${timeoutMs / 1000} s`, { cause: error })
      throw error
    } finally {
      clearTimeout(timer)
    }
    if (text.length > FEED_MAX_BYTES) throw new Error('the feed answered with more than 2 MB')
    blocks = parseKpFeed(text)
  } catch (error) {
    const why = error instanceof Error ? error.message : String(error)
    await store.repos.corrections.recordFeed({ url, attemptAt, ok: false, error: why })
    return { ok: false, url, error: why, message: `The space-weather feed could not be read: ${why}.` }
  }
  const changed = await store.transaction(async (repos) => {
    const before = await repos.corrections.kpBlocksBetween(blocks[0].blockStart.getTime(), Infinity)
    const same =
      before.length === blocks.length && before.every((b, i) => b.blockStart.getTime() === blocks[i].blockStart.getTime() && b.kp === blocks[i].kp)
    await repos.corrections.replaceKpFrom(blocks[0].blockStart.getTime(), blocks, attemptAt)
    await repos.corrections.pruneKpBefore(nowMs - 14 * DAY_MS)
    await repos.corrections.recordFeed({ url, attemptAt, ok: true, error: null })
    return !same
  })
  if (changed) void emit('planning.changed', { serviceLevelIds: 'all' })
  const stormDays = stormDaysOf(blocks.map((b) => ({ start: b.blockStart.getTime(), kp: b.kp })))
  return {
    ok: true,
    url,
    blocks: blocks.length,
    stormDays,
    message: `Read ${blocks.length} Kp blocks${stormDays.length ? `; G${STORM_G} or worse on ${stormDays.join(', ')}` : '; no storm of G3 or worse'}.`,
  }
}

/** UTC days with a block of G3 or worse. */
export function stormDaysOf(blocks: ReadonlyArray<{ start: number; kp: number }>): string[] {
  return [...new Set(blocks.filter((b) => gScaleOfKp(b.kp) >= STORM_G).map((b) => new Date(b.start).toISOString().slice(0, 10)))]
}

/** The stored record of the feed's fetches (null: never fetched). */
export interface KpFeedRecord {
  lastOkAt: Date | null
  lastAttemptAt: Date | null
  lastError: string | null
}

/**
 * The feed's state at `nowMs`: 'none' when it was never read (and no blocks are stored);
 * 'stale' when the last good read is more than 36 hours old, a fetch failed after it, or
 * blocks are stored without a good read; 'current' otherwise. `failedSince` says the last
 * fetch failed after the last good read.
 *
 * @example
 * kpFeedState({ lastOkAt: new Date(0), lastAttemptAt: new Date(0), lastError: null }, 40 * 3_600_000, true)
 * // -> { state: 'stale', lastOkAt: new Date(0), failedSince: false }
 */
export function kpFeedState(feed: KpFeedRecord | null, nowMs: number, hasBlocks: boolean): { state: SpaceWeatherState; lastOkAt: Date | null; failedSince: boolean } {
  const lastOkAt = feed?.lastOkAt ?? null
  const lastOk = lastOkAt?.getTime() ?? null
  const failedSince = Boolean(feed?.lastError && feed.lastAttemptAt && (lastOk === null || feed.lastAttemptAt.getTime() > lastOk))
  const state: SpaceWeatherState = lastOk === null ? (hasBlocks ? 'stale' : 'none') : nowMs - lastOk > KP_STALE_MS || failedSince ? 'stale' : 'current'
  return { state, lastOkAt, failedSince }
}

/** The feed's state and its blocks from `fromMs` on. */
export async function spaceWeatherStatus(store: Store, config: Pick<Config, 'kpFeedUrl' | 'publicUrl'>, nowMs: number, fromMs: number): Promise<SpaceWeatherStatus> {
  const [feed, rows] = await Promise.all([store.repos.corrections.feedStatus(), store.repos.corrections.kpBlocksBetween(fromMs, Infinity)])
  const { state, failedSince } = kpFeedState(feed, nowMs, rows.length > 0)
  const blocks: KpBlockView[] = rows.map((b) => ({ start: b.blockStart.toISOString(), end: b.blockEnd.toISOString(), kp: b.kp, g: gScaleOfKp(b.kp), observed: b.observed }))
  return {
    state,
    url: kpFeedUrlOf(config),
    usesLocalFake: !config.kpFeedUrl,
    lastOkAt: feed?.lastOkAt?.toISOString() ?? null,
    lastAttemptAt: feed?.lastAttemptAt?.toISOString() ?? null,
    lastError: failedSince ? (feed?.lastError ?? null) : null,
    blocks,
    stormDays: stormDaysOf(rows.map((b) => ({ start: b.blockStart.getTime(), kp: b.kp }))),
  }
}

export function createSpaceWeatherService(ctx: ServiceContext) {
  const { store, config } = ctx
  return {
    status: (nowMs = Date.now()) => spaceWeatherStatus(store, config, nowMs, Math.floor(nowMs / DAY_MS) * DAY_MS - DAY_MS),
    /** Fetches now (office staff and admins); 502 with the reason when the feed fails. */
    async run(options: Parameters<typeof fetchKpFeed>[2] = {}) {
      const result = await fetchKpFeed(store, kpFeedUrlOf(config), options)
      if (!result.ok) throw new HttpError(502, 'feed_failed', result.message)
      return result
    },
  }
}
export type SpaceWeatherService = ReturnType<typeof createSpaceWeatherService>
