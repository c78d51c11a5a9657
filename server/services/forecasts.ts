// Stored field forecasts for the outlook: one field's hours, or every field of a farm
// (the day view). Clients read only their own farms (404 otherwise).
import { createHash } from 'node:crypto'
import { promisify } from 'node:util'
import { gzip as zlibGzip } from 'node:zlib'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import {
  forecastWindow,
  type FarmForecastResponse,
  type FieldForecastResponse,
  type ForecastHour,
  type ForecastQuery,
} from '../../shared/schemas/forecast.ts'
import { canSeeFarm } from '../auth/access.ts'
import type { PendingForecastJob, StoredForecastMeta } from '../db/repositories/forecasts.ts'
import type { JobRow, WorkTypeRow } from '../db/schema-planning.ts'
import { storedWeekHoldsWindow } from '../forecast/fieldInputs.ts'
import { toForecastHour } from '../forecast/storedHour.ts'
import { notFound } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'

const HOUR_MS = 3_600_000

/**
 * Whether stored hours may not match the current inputs (see FieldForecastResponse.stale):
 * a job pending, nothing stored, or not the farm's current week (`zone`) in one piece.
 */
export function isStale(
  meta: StoredForecastMeta | undefined,
  pending: PendingForecastJob | JobRow | null | undefined,
  nowMs: number,
  zone: string,
): boolean {
  if (pending) return true
  return !storedWeekHoldsWindow(meta, forecastWindow(nowMs, zone)) || meta.minVersion !== meta.maxVersion
}

/**
 * Hours of a recently read field, parsed once and serialized once. A stored forecast only
 * changes when a job replaces it, so an entry is used only while the field's newest job
 * id, computed time and the asked range still match what the database says (checked on
 * every request, so several server processes stay correct).
 */
interface CachedHours {
  /** job id, computed time and range the entry was made for */
  key: string
  /** ids of the work types the hours carry */
  usedWorkTypes: Set<string>
  /** `hours` as UTF-8 JSON, written as is by every response that carries them */
  json: Buffer
}
const HOURS_CACHE_SIZE = 200
const closingBrace = Buffer.from('}')

/** A field's forecast as the API sends it: the JSON body in parts and a validator for it. */
export interface FieldForecastBody {
  /** the body is these buffers one after the other */
  parts: Buffer[]
  etag: string
  /** set when `parts` holds the body gzip-compressed */
  encoding?: 'gzip'
}

const gzip = promisify(zlibGzip)

/**
 * Per key the newest value of one version, or the making of it under way (so that
 * concurrent misses make it once). The least recently used key goes past `size`; a value
 * whose making failed is not kept.
 */
class VersionedCache<K, V> {
  private readonly entries = new Map<K, { version: string; value: Promise<V> }>()

  constructor(private readonly size: number) {}

  get(key: K, version: string, make: () => Promise<V>): Promise<V> {
    const hit = this.entries.get(key)
    this.entries.delete(key)
    if (hit && hit.version === version) {
      this.entries.set(key, hit)
      return hit.value
    }
    const entry = { version, value: make() }
    this.entries.set(key, entry)
    if (this.entries.size > this.size) this.entries.delete(this.entries.keys().next().value!)
    entry.value.catch(() => {
      if (this.entries.get(key) === entry) this.entries.delete(key)
    })
    return entry.value
  }
}

export function createForecastsService(ctx: ServiceContext) {
  const { store } = ctx
  /**
   * Per field the newest body gzip-compressed, keyed by its ETag: a week changes far less
   * often than it is read, so each version is compressed once (on the libuv thread pool).
   */
  const gzipped = new VersionedCache<number, Buffer>(HOURS_CACHE_SIZE)
  const hoursCache = new VersionedCache<number, CachedHours>(HOURS_CACHE_SIZE)
  /** The work types, read again only when their stamp (count, newest id, last change) moves. */
  const workTypesCache = new VersionedCache<'all', WorkTypeRow[]>(1)

  function hoursOf(fieldId: number, meta: StoredForecastMeta | undefined, from: Date, to: Date): Promise<CachedHours> {
    const key = `${meta?.maxJobId ?? '-'}/${meta?.computedAt?.getTime() ?? '-'}/${from.getTime()}/${to.getTime()}`
    return hoursCache.get(fieldId, key, async () => {
      const hours = (await store.repos.forecasts.hours([fieldId], from, to)).map(toForecastHour)
      return { key, usedWorkTypes: usedWorkTypes(hours), json: Buffer.from(JSON.stringify(hours)) }
    })
  }

  /** Ids of the work types the hours carry. */
  function usedWorkTypes(hours: ForecastHour[]): Set<string> {
    const used = new Set<string>()
    for (const h of hours) for (const id of Object.keys(h.workTypes)) used.add(id)
    return used
  }

  /** The work types of `used` (all active ones when there are none), in display order. */
  function namesFor(used: Set<string>, all: WorkTypeRow[]): Array<{ id: number; name: string }> {
    return all.filter((w) => used.has(String(w.id)) || (used.size === 0 && w.active)).map((w) => ({ id: w.id, name: w.name }))
  }

  function range(query: ForecastQuery, meta: StoredForecastMeta | undefined, nowMs: number, zone: string): { from: Date; to: Date } {
    const window = forecastWindow(nowMs, zone)
    const from = query.from ?? meta?.firstHour ?? new Date(window.startMs)
    const to = query.to ?? (meta?.lastHour ? new Date(meta.lastHour.getTime() + HOUR_MS) : new Date(window.endMs))
    return { from, to }
  }

  function assemble(
    field: { id: number; name: string; farmId: number },
    meta: StoredForecastMeta | undefined,
    pending: PendingForecastJob | JobRow | null | undefined,
    nowMs: number,
    zone: string,
  ): Omit<FieldForecastResponse, 'workTypes' | 'hours'> {
    return {
      fieldId: field.id,
      fieldName: field.name,
      farmId: field.farmId,
      inputsVersion: meta?.maxVersion ?? '',
      computedAt: meta?.computedAt?.toISOString() ?? null,
      windowStart: meta?.firstHour?.toISOString() ?? null,
      windowEnd: meta?.lastHour ? new Date(meta.lastHour.getTime() + HOUR_MS).toISOString() : null,
      stale: isStale(meta, pending, nowMs, zone),
      pendingJob: pending ? { id: pending.id, status: pending.status as 'queued' | 'running', progress: pending.progress } : null,
      orbitSummary: meta?.orbitSummary ?? '',
    }
  }

  /** One field's stored week without the hours' JSON: the response head and the cached hours. */
  async function fieldParts(
    user: SessionUser,
    fieldId: number,
    query: ForecastQuery,
  ): Promise<{ head: Omit<FieldForecastResponse, 'hours'>; hours: CachedHours }> {
    const nowMs = Date.now()
    // One lookup first: nothing more is read before the visibility check.
    const state = await store.repos.forecasts.readState(fieldId)
    if (!state || !canSeeFarm(user, state.field.farmId)) throw notFound('The field')
    const { field, meta, pending, timeZone } = state
    const { from, to } = range(query, meta, nowMs, timeZone)
    const [hours, allWorkTypes] = await Promise.all([
      hoursOf(fieldId, meta, from, to),
      workTypesCache.get('all', state.workTypesStamp, () => store.repos.workTypes.list()),
    ])
    const head = { ...assemble(field, meta, pending, nowMs, timeZone), workTypes: namesFor(hours.usedWorkTypes, allWorkTypes) }
    return { head, hours }
  }

  return {
    /**
     * One field's stored week (a FieldForecastResponse) as JSON: the stored hours are
     * serialized once per stored version, and the ETag changes whenever the body does.
     */
    async fieldBody(user: SessionUser, fieldId: number, query: ForecastQuery, acceptsGzip = false): Promise<FieldForecastBody> {
      const { head, hours } = await fieldParts(user, fieldId, query)
      const headJson = JSON.stringify(head)
      const etag = `W/"${createHash('sha1').update(headJson).update(hours.key).digest('base64url')}"`
      const parts = [Buffer.from(`${headJson.slice(0, -1)},"hours":`), hours.json, closingBrace]
      if (!acceptsGzip) return { parts, etag }
      return { parts: [await gzipped.get(fieldId, etag, () => gzip(Buffer.concat(parts)))], etag, encoding: 'gzip' }
    },

    async farm(user: SessionUser, farmId: number, query: ForecastQuery): Promise<FarmForecastResponse> {
      const farm = canSeeFarm(user, farmId) ? await store.repos.farms.findById(farmId) : null
      if (!farm) throw notFound('The farm')
      const nowMs = Date.now()
      const fields = await store.repos.forecasts.fieldsOfFarm(farmId)
      const ids = fields.map((f) => f.id)
      const [metaMap, pendingMap] = await Promise.all([
        store.repos.forecasts.storedMeta(ids),
        store.repos.jobs.pendingForFields(ids),
      ])
      const window = forecastWindow(nowMs, farm.timeZone)
      const from = query.from ?? new Date(window.startMs)
      const to = query.to ?? new Date(window.endMs)
      const rows = await store.repos.forecasts.hours(ids, from, to)
      const byField = new Map<number, ForecastHour[]>(ids.map((id) => [id, []]))
      for (const row of rows) byField.get(row.fieldId)?.push(toForecastHour(row))
      const all = [...byField.values()].flat()
      return {
        farmId,
        from: from.toISOString(),
        to: to.toISOString(),
        fields: fields.map((f) => ({ ...assemble(f, metaMap.get(f.id), pendingMap.get(f.id), nowMs, farm.timeZone), hours: byField.get(f.id) ?? [] })),
        workTypes: namesFor(usedWorkTypes(all), await store.repos.workTypes.list()),
      }
    },
  }
}
export type ForecastsService = ReturnType<typeof createForecastsService>
