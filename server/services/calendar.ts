// Calendar feeds: a per-farm iCalendar (RFC 5545) feed of planned and confirmed passes and,
// when the link asks for it, the Clear windows per work type as free (transparent) events.
// Anyone holding the link can read the feed (phones subscribe without a session), so the
// token is 32 random bytes (base64url) and only its SHA-256 hash is stored; a revoked or
// unknown token is 404. Times are written in UTC; the farm's zone is noted in
// X-WR-TIMEZONE and in each event's description.
import { createHash, randomBytes } from 'node:crypto'
import ical, { ICalEventBusyStatus, ICalEventStatus, ICalEventTransparency, type ICalEventData } from 'ical-generator'
import { HOUR_MS, MINUTE_MS, ceilHour, localLabel, type PlanningHour } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { activePassStatuses, type CalendarToken, type CalendarTokenInput, type CreatedCalendarToken } from '../../shared/schemas/passes.ts'
import { assertFarmVisible, assertRole } from '../auth/access.ts'
import type { CalendarTokenRow } from '../db/repositories/calendarTokens.ts'
import type { PassDetailRow } from '../db/repositories/passes.ts'
import { notFound } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'
import { hourStates } from './windows.ts'

/** Passes in the feed: from two weeks back to eight weeks ahead. */
const FEED_PAST_MS = 14 * 24 * HOUR_MS
const FEED_AHEAD_MS = 56 * 24 * HOUR_MS
/** Clear windows: the stored forecast's week. */
const WINDOWS_AHEAD_MS = 8 * 24 * HOUR_MS
/** Subscribed calendars are asked to refresh hourly (RFC 7986 REFRESH-INTERVAL, X-PUBLISHED-TTL). */
const REFRESH_S = 3600

const TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/

export const hashToken = (token: string) => createHash('sha256').update(token).digest('hex')

function toToken(row: CalendarTokenRow & { createdByName: string | null }): CalendarToken {
  return {
    id: row.id,
    farmId: row.farmId,
    label: row.label,
    includeWindows: row.includeWindows,
    createdBy: row.createdBy,
    createdByName: row.createdByName,
    createdAt: row.createdAt.toISOString(),
    revokedAt: row.revokedAt?.toISOString() ?? null,
  }
}

/** Contiguous runs of Clear hours as [startMs, endMs) spans. */
export function clearRuns(hours: readonly PlanningHour[]): Array<{ startMs: number; endMs: number }> {
  const sorted = [...hours].sort((a, b) => a.startMs - b.startMs)
  const runs: Array<{ startMs: number; endMs: number }> = []
  for (const h of sorted) {
    if (h.state !== 'clear') continue
    const last = runs.at(-1)
    if (last && last.endMs === h.startMs) last.endMs += HOUR_MS
    else runs.push({ startMs: h.startMs, endMs: h.startMs + HOUR_MS })
  }
  return runs
}

const feedUrl = (publicUrl: string, token: string) => `${publicUrl}/api/calendar/${token}.ics`

/**
 * The calendar event of a booked pass (UTC times, the farm's local times in the
 * description); shared by the feed and the weekly plan's .ics attachment.
 */
export function passEventData(p: PassDetailRow, zone: string): ICalEventData {
  const start = p.startAt.getTime()
  const end = start + p.durationMin * MINUTE_MS
  const lines = [
    `${p.workTypeName} on ${p.fieldName} (${p.farmName})`,
    `Farm time (${zone}): ${localLabel(start, zone)} to ${localLabel(end, zone)}`,
    `Status: ${p.status}`,
    p.machineName ? `Machine: ${p.machineName}${p.crew ? ` (crew: ${p.crew})` : ''}` : 'Machine: not assigned',
  ]
  if (p.atRisk) lines.push(`At risk: ${p.atRiskReason ?? 'the forecast no longer holds'}`)
  if (p.notes) lines.push(`Notes: ${p.notes}`)
  return {
    id: `pass-${p.id}@skyfurrow`,
    start: p.startAt,
    end: new Date(end),
    stamp: p.updatedAt,
    lastModified: p.updatedAt,
    summary: `${p.atRisk ? 'At risk: ' : ''}${p.workTypeName} · ${p.fieldName}`,
    description: lines.join('\n'),
    status: p.status === 'planned' ? ICalEventStatus.TENTATIVE : ICalEventStatus.CONFIRMED,
    busystatus: ICalEventBusyStatus.BUSY,
    transparency: ICalEventTransparency.OPAQUE,
  }
}

export function createCalendarService(ctx: ServiceContext) {
  const { store, config } = ctx

  /** Clients manage only the links they created; admins and office staff every link of the farm. */
  const ownOnly = (user: SessionUser) => (user.role === 'client' ? user.id : undefined)

  return {
    async listTokens(user: SessionUser, farmId: number): Promise<CalendarToken[]> {
      assertRole(user, 'admin', 'office', 'client')
      assertFarmVisible(user, farmId)
      if (!(await store.repos.farms.findById(farmId))) throw notFound('The farm')
      return (await store.repos.calendarTokens.listByFarm(farmId, ownOnly(user))).map(toToken)
    },

    async createToken(user: SessionUser, farmId: number, input: CalendarTokenInput): Promise<CreatedCalendarToken> {
      assertRole(user, 'admin', 'office', 'client')
      assertFarmVisible(user, farmId)
      if (!(await store.repos.farms.findById(farmId))) throw notFound('The farm')
      const token = randomBytes(32).toString('base64url')
      const id = await store.repos.calendarTokens.insert({
        farmId,
        tokenHash: hashToken(token),
        label: input.label,
        includeWindows: input.includeWindows,
        createdBy: user.id,
      })
      const row = await store.repos.calendarTokens.findById(id)
      return { ...toToken(row!), token, url: feedUrl(config.publicUrl, token) }
    },

    async revokeToken(user: SessionUser, id: number): Promise<void> {
      assertRole(user, 'admin', 'office', 'client')
      const row = await store.repos.calendarTokens.findById(id)
      if (!row || !(user.role !== 'client' || (user.farmIds.includes(row.farmId) && row.createdBy === user.id))) {
        throw notFound('The calendar link')
      }
      await store.repos.calendarTokens.revoke(id, new Date())
    },

    /** The .ics text of the feed behind `token`; 404 for an unknown or revoked token. */
    async feed(token: string, nowMs = Date.now()): Promise<{ filename: string; content: string }> {
      if (!TOKEN_PATTERN.test(token)) throw notFound('The calendar')
      const repos = store.repos
      const row = await repos.calendarTokens.findActiveByHash(hashToken(token))
      if (!row) throw notFound('The calendar')
      const farm = await repos.farms.findById(row.farmId)
      if (!farm) throw notFound('The calendar')
      const zone = farm.timeZone

      const cal = ical({
        name: `${farm.name}: passes`,
        description: `Planned and confirmed passes of ${farm.name} from Skyfurrow. Times are in UTC; the farm's time zone is ${zone}.`,
        prodId: { company: 'Skyfurrow', product: 'Pass calendar', language: 'EN' },
        ttl: REFRESH_S,
      })
      // ttl writes REFRESH-INTERVAL and X-PUBLISHED-TTL; the zone is noted for people and clients.
      cal.x('X-WR-TIMEZONE', zone)

      const passes = await repos.passes.list({
        farmId: farm.id,
        statuses: activePassStatuses,
        from: new Date(nowMs - FEED_PAST_MS),
        to: new Date(nowMs + FEED_AHEAD_MS),
      })
      for (const p of passes) cal.createEvent(passEventData(p, zone))

      if (row.includeWindows) {
        const fields = await repos.fields.listByFarm(farm.id)
        const workTypes = await repos.workTypes.list({ onlyActive: true })
        const fromMs = ceilHour(nowMs) - HOUR_MS
        const rows = await repos.forecasts.hours(fields.map((f) => f.id), new Date(fromMs), new Date(fromMs + WINDOWS_AHEAD_MS))
        for (const field of fields) {
          const own = rows.filter((r) => r.fieldId === field.id)
          for (const wt of workTypes) {
            for (const run of clearRuns(hourStates(own, wt.id))) {
              cal.createEvent({
                id: `clear-${field.id}-${wt.id}-${run.startMs}@skyfurrow`,
                start: new Date(run.startMs),
                end: new Date(run.endMs),
                stamp: new Date(nowMs),
                summary: `Clear for ${wt.name} · ${field.name}`,
                description: `Forecast: every hour Clear for ${wt.name} on ${field.name}.\nFarm time (${zone}): ${localLabel(run.startMs, zone)} to ${localLabel(run.endMs, zone)}`,
                busystatus: ICalEventBusyStatus.FREE,
                transparency: ICalEventTransparency.TRANSPARENT,
              })
            }
          }
        }
      }

      const slug = farm.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'farm'
      return { filename: `${slug}.ics`, content: cal.toString() }
    },
  }
}
export type CalendarService = ReturnType<typeof createCalendarService>
