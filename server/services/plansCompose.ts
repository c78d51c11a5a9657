// Composing a farm's weekly plan from the stored passes and forecasts, the plan's
// recipients, the signed opt-out links and queueing deliveries. Used by the plans service
// (requests) and the plan jobs (the automatic weekly send), so it takes a Store and the
// config rather than a request context.
//
// Never sent twice: each delivery is a plan_sends row whose idempotency key (farm, week,
// revision, recipient and a resend counter) is unique; the row and its 'plan-send' job are
// written in one transaction, and the job checks the row's status before sending.
import { createHash, createHmac, timingSafeEqual } from 'node:crypto'
import ical, { ICalCalendarMethod } from 'ical-generator'
import { DateTime } from 'luxon'
import { HOUR_MS, MINUTE_MS } from '../../shared/planning/index.ts'
import { emailSchema } from '../../shared/schemas/auth.ts'
import { activePassStatuses } from '../../shared/schemas/passes.ts'
import type { PlanEvent, PlanRecipient, PlanSendResult } from '../../shared/schemas/plans.ts'
import type { Config } from '../config.ts'
import type { Repositories, Store } from '../db/repositories/index.ts'
import { isDuplicate } from '../db/repositories/plans.ts'
import type { PlanRevisionRow } from '../db/schema-planning.ts'
import { badRequest, notFound } from '../http/errors.ts'
import { withDeadlockRetry } from '../db/retry.ts'
import { wakeJobRunners } from '../queue/enqueue.ts'
import { planHtml, planSubject, planText, revisionSubject, type PlanContent, type PlanDay, type PlanFieldHours, type PlanRiskLine } from '../mail/planTemplate.ts'
import { clearRuns, passEventData } from './calendar.ts'
import { hourStates } from './windows.ts'
import { planSpaceWeather } from './planSpaceWeather.ts'

export const PLAN_SEND_KIND = 'plan-send'
export const PLAN_SCHEDULE_KIND = 'plan-schedule'
/** Attempts of a delivery job (retried with the runner's exponential backoff). */
export const PLAN_SEND_ATTEMPTS = 6

export interface ComposedPlan {
  farm: { id: number; name: string; timeZone: string }
  weekStart: string
  note: string
  subject: string
  html: string
  text: string
  ics: string
  icsFilename: string
  events: PlanEvent[]
  counts: { passes: number; atRisk: number; fields: number }
}

/** Local start and end (exclusive) of the week beginning on `weekStart` in `zone`. */
export function weekSpan(weekStart: string, zone: string): { startMs: number; endMs: number } {
  const start = DateTime.fromISO(weekStart, { zone }).startOf('day')
  return { startMs: start.toMillis(), endMs: start.plus({ days: 7 }).toMillis() }
}

/** The Monday (YYYY-MM-DD) of the week holding `ms` in `zone`. */
export function mondayOf(ms: number, zone: string): string {
  return DateTime.fromMillis(ms, { zone }).startOf('week').toISODate()!
}

const dt = (ms: number, zone: string) => DateTime.fromMillis(ms, { zone }).setLocale('en-US')

/** "Mon 7 Dec – Sun 13 Dec 2026" */
export function weekLabel(weekStart: string, zone: string): string {
  const start = DateTime.fromISO(weekStart, { zone }).setLocale('en-US')
  const end = start.plus({ days: 6 })
  return `${start.toFormat('ccc d LLL')} – ${end.toFormat('ccc d LLL yyyy')}`
}

/** "America/Chicago (CST)", or "(CDT, then CST)" when the week crosses a clock change. */
function zoneLabel(zone: string, span: { startMs: number; endMs: number }): string {
  const a = dt(span.startMs, zone).toFormat('ZZZZ')
  const b = dt(span.endMs - 1, zone).toFormat('ZZZZ')
  return a === b ? `${zone} (${a})` : `${zone} (${a}, then ${b})`
}

/**
 * A span as compact local time: "Tue 09:00-15:00", "Tue 22:00-24:00", "Tue 22:00-Wed 02:00".
 * @example compactRange(Date.UTC(2026,11,8,15), Date.UTC(2026,11,8,21), 'America/Chicago') // -> 'Tue 09:00-15:00'
 */
export function compactRange(startMs: number, endMs: number, zone: string): string {
  const s = dt(startMs, zone)
  const e = dt(endMs, zone)
  const head = s.toFormat('ccc HH:mm')
  if (e.hasSame(s, 'day')) return `${head}-${e.toFormat('HH:mm')}`
  if (e.toFormat('HH:mm') === '00:00' && e.minus({ days: 1 }).hasSame(s, 'day')) return `${head}-24:00`
  return `${head}-${e.toFormat('ccc HH:mm')}`
}

/** "Planned", "Confirmed", "Started Thu 08:05", "Done Thu 14:10": how a pass stands, for the farm. */
export function planStatus(p: { status: string; statusChangedAt: Date | null }, zone: string): string {
  const at = p.statusChangedAt ? ` ${dt(p.statusChangedAt.getTime(), zone).toFormat('ccc HH:mm')}` : ''
  if (p.status === 'done') return `Done${at}`
  if (p.status === 'started') return `Started${at}`
  return p.status === 'confirmed' ? 'Confirmed' : 'Planned'
}

const slug = (name: string) => name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'farm'

export async function composePlan(repos: Repositories, farmId: number, weekStart: string, note: string): Promise<ComposedPlan> {
  const farm = await repos.farms.findById(farmId)
  if (!farm) throw notFound('The farm')
  const zone = farm.timeZone
  const span = weekSpan(weekStart, zone)
  const [business, passes, fields, workTypes] = await Promise.all([
    repos.business.get(),
    repos.passes.list({ farmId, statuses: [...activePassStatuses, 'done'], from: new Date(span.startMs), to: new Date(span.endMs) }),
    repos.fields.listByFarm(farmId),
    repos.workTypes.list({ onlyActive: true }),
  ])
  const hours = fields.length ? await repos.forecasts.hours(fields.map((f) => f.id), new Date(span.startMs), new Date(span.endMs)) : []

  // Passes per local day (every day of the week, so DST weeks have the right labels).
  const days: PlanDay[] = []
  for (let d = 0; d < 7; d++) {
    const day = DateTime.fromISO(weekStart, { zone }).plus({ days: d }).setLocale('en-US')
    days.push({ label: day.toFormat('cccc d LLLL'), passes: [] })
  }
  const atRisk: PlanRiskLine[] = []
  for (const p of passes) {
    const startMs = p.startAt.getTime()
    const endMs = startMs + p.durationMin * MINUTE_MS
    const s = dt(startMs, zone)
    const index = Math.floor(s.startOf('day').diff(DateTime.fromISO(weekStart, { zone }), 'days').days + 0.5)
    const e = dt(endMs, zone)
    const time = `${s.toFormat('HH:mm')}-${e.hasSame(s, 'day') ? e.toFormat('HH:mm') : e.toFormat('ccc HH:mm')}`
    const crew = p.machineName ? `${p.machineName}${p.crew ? `, ${p.crew}` : ''}` : 'Not assigned yet'
    const line = { time, field: p.fieldName, workType: p.workTypeName, crew, status: planStatus(p, zone), atRisk: p.atRisk }
    // A pass that began before the week (overlapping Monday morning) goes under Monday.
    days[Math.max(0, Math.min(6, index))].passes.push(line)
    if (p.atRisk) {
      atRisk.push({
        when: s.toFormat('ccc d LLL HH:mm'),
        field: p.fieldName,
        workType: p.workTypeName,
        reason: p.atRiskReason ?? 'The forecast no longer holds for this pass.',
        suggestion: p.suggestedStartAt ? dt(p.suggestedStartAt.getTime(), zone).toFormat('ccc d LLL HH:mm') : null,
      })
    }
  }

  // Clear hours per field and work type, as compact local ranges.
  let lastHourMs = -Infinity
  for (const r of hours) lastHourMs = Math.max(lastHourMs, r.hourStart.getTime())
  const fieldHours: PlanFieldHours[] = fields.map((f) => {
    const own = hours.filter((r) => r.fieldId === f.id)
    return {
      name: f.name,
      areaHa: f.areaHa,
      workTypes: workTypes.map((wt) => {
        if (own.length === 0) return { name: wt.name, ranges: null }
        return { name: wt.name, ranges: clearRuns(hourStates(own, wt.id)).map((run) => compactRange(run.startMs, run.endMs, zone)) }
      }),
    }
  })
  let forecastNote: string | null = null
  if (fields.length && hours.length === 0) forecastNote = 'There is no forecast for this week yet.'
  else if (hours.length && lastHourMs + HOUR_MS < span.endMs) {
    forecastNote = `The forecast reaches to ${dt(lastHourMs + HOUR_MS, zone).toFormat('cccc d LLLL HH:mm')}; later hours follow in next week's plan.`
  }

  const spaceWeather = await planSpaceWeather(repos, hours, zone, Date.now(), span.endMs)
  const content: PlanContent = {
    spaceWeather,
    businessName: business?.name ?? 'Your contractor',
    farmName: farm.name,
    zoneLabel: zoneLabel(zone, span),
    weekLabel: weekLabel(weekStart, zone),
    note,
    days,
    fields: fieldHours,
    atRisk,
    forecastNote,
  }

  const cal = ical({
    name: `${farm.name}: passes ${content.weekLabel}`,
    description: `Passes of ${farm.name} in the week of ${content.weekLabel}, from ${content.businessName}. Times are in UTC; the farm's time zone is ${zone}.`,
    prodId: { company: 'Skyfurrow', product: 'Weekly plan', language: 'EN' },
    method: ICalCalendarMethod.PUBLISH,
  })
  cal.x('X-WR-TIMEZONE', zone)
  const events: PlanEvent[] = []
  for (const p of passes) {
    const data = passEventData(p, zone)
    cal.createEvent(data)
    events.push({
      uid: String(data.id),
      summary: String(data.summary),
      startAt: p.startAt.toISOString(),
      endAt: new Date(p.startAt.getTime() + p.durationMin * MINUTE_MS).toISOString(),
      description: String(data.description ?? ''),
    })
  }

  return {
    farm: { id: farm.id, name: farm.name, timeZone: zone },
    weekStart,
    note,
    subject: planSubject(content),
    html: planHtml(content),
    text: planText(content),
    ics: cal.toString(),
    icsFilename: `plan-${slug(farm.name)}-${weekStart}.ics`,
    events,
    counts: { passes: passes.length, atRisk: atRisk.length, fields: fields.length },
  }
}

export const icsFilenameOf = (farmName: string, weekStart: string) => `plan-${slug(farmName)}-${weekStart}.ics`

export function sameContent(rev: Pick<PlanRevisionRow, 'revision' | 'note' | 'subject' | 'html' | 'textBody' | 'ics'>, plan: ComposedPlan): boolean {
  // Revisions stored before subjects named the revision carry the plain subject.
  const subjectSame = rev.subject === revisionSubject(plan.subject, rev.revision) || rev.subject === plan.subject
  return rev.note === plan.note && subjectSame && rev.html === plan.html && rev.textBody === plan.text && rev.ics === plan.ics
}

// ---- opt-out links ----------------------------------------------------------------

/** HMAC-SHA256 over the farm id and the lower-cased address, with the server's secret. */
function mac(secret: string, farmId: number, email: string): Buffer {
  return createHmac('sha256', secret).update(`plan-opt-out\n${farmId}\n${email.toLowerCase()}`).digest()
}

export function optOutToken(secret: string, farmId: number, email: string): string {
  return `${farmId}.${Buffer.from(email.toLowerCase()).toString('base64url')}.${mac(secret, farmId, email).toString('base64url')}`
}

/** The farm and address of a valid token, or null. */
export function readOptOutToken(secret: string, token: string): { farmId: number; email: string } | null {
  const parts = token.split('.')
  if (parts.length !== 3) return null
  const farmId = Number(parts[0])
  if (!Number.isInteger(farmId) || farmId <= 0) return null
  const email = Buffer.from(parts[1], 'base64url').toString('utf8')
  if (!email.includes('@')) return null
  const given = Buffer.from(parts[2], 'base64url')
  const expected = mac(secret, farmId, email)
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return null
  return { farmId, email: email.toLowerCase() }
}

export const optOutUrl = (config: Pick<Config, 'publicUrl' | 'planLinkSecret'>, farmId: number, email: string) =>
  `${config.publicUrl}/api/plans/opt-out?token=${optOutToken(config.planLinkSecret, farmId, email)}`

// ---- recipients and deliveries --------------------------------------------------------

/** The farm's active client users and the extra addresses (each checked, the bad one named). */
export async function planRecipients(repos: Repositories, farmId: number, extra: readonly string[]): Promise<PlanRecipient[]> {
  const bad: Record<string, string> = {}
  const extras: string[] = []
  extra.forEach((raw, i) => {
    const text = raw.trim()
    if (!text) return
    const parsed = emailSchema.safeParse(text)
    if (parsed.success) extras.push(parsed.data)
    else bad[`extraRecipients.${i}`] = `"${text.slice(0, 80)}" is not a valid e-mail address`
  })
  if (Object.keys(bad).length) {
    throw badRequest(`Check the extra recipients: ${Object.values(bad).join('; ')}.`, bad)
  }
  const clients = (await repos.plans.clientsOfFarm(farmId)).filter((c) => c.active)
  const optedOut = new Set((await repos.plans.optOuts(farmId)).map((o) => o.email))
  const out: PlanRecipient[] = clients.map((c) => ({
    email: c.email.toLowerCase(),
    name: c.name,
    userId: c.id,
    units: c.units,
    kind: 'client',
    optedOut: optedOut.has(c.email.toLowerCase()),
  }))
  const seen = new Set(out.map((r) => r.email))
  const known = await repos.plans.usersByEmail(extras.filter((e) => !seen.has(e)))
  for (const email of extras) {
    if (seen.has(email)) continue
    seen.add(email)
    const user = known.get(email)
    out.push({ email, name: null, userId: user?.id ?? null, units: user?.units ?? 'metric', kind: 'extra', optedOut: optedOut.has(email) })
  }
  return out
}

const emailHash = (email: string) => createHash('sha256').update(email.toLowerCase()).digest('hex').slice(0, 32)

/** The idempotency key of a delivery: farm, week, revision, recipient and resend counter. */
export function sendKey(farmId: number, weekStart: string, revision: number, email: string, resend = 0): string {
  return `plan:${farmId}:${weekStart}:r${revision}:${emailHash(email)}:s${resend}`
}

/** Inserts the send row (unless its key exists) and its job, in the caller's transaction. */
async function queueDelivery(
  repos: Repositories,
  rev: { id: number; farmId: number },
  r: { email: string; userId: number | null },
  key: string,
  by: { userId: number | null; automatic: boolean },
): Promise<boolean> {
  const { id, inserted } = await repos.plans.insertSendOnce({
    revisionId: rev.id,
    recipient: r.email,
    userId: r.userId,
    idempotencyKey: key,
    sentBy: by.userId,
    automatic: by.automatic,
  })
  if (!inserted) return false
  await repos.jobs.enqueue(
    { kind: PLAN_SEND_KIND, farmId: rev.farmId, dedupeKey: `plan-send:${id}`, payload: { sendId: id }, maxAttempts: PLAN_SEND_ATTEMPTS, createdBy: by.userId },
    'once',
  )
  return true
}

/**
 * Stores the plan as a revision (a new one when note or content changed since the latest)
 * and queues one delivery per recipient that this revision has not been queued for.
 */
export async function sendPlan(
  store: Store,
  input: { farmId: number; weekStart: string; note: string; extraRecipients: readonly string[] },
  by: { userId: number | null; automatic: boolean },
): Promise<PlanSendResult> {
  const plan = await composePlan(store.repos, input.farmId, input.weekStart, input.note)
  const recipients = await planRecipients(store.repos, input.farmId, input.extraRecipients)
  if (recipients.length === 0) {
    throw badRequest('This farm has no client users to send to: add an extra recipient, or link clients to the farm on the Farms page.', {
      extraRecipients: 'Add at least one address',
    })
  }
  const run = () =>
    withDeadlockRetry(store, async (repos) => {
      const latest = await repos.plans.latestRevision(input.farmId, input.weekStart, true)
      let rev: { id: number; revision: number; created: boolean }
      if (latest && sameContent(latest, plan)) rev = { id: latest.id, revision: latest.revision, created: false }
      else {
        const revision = (latest?.revision ?? 0) + 1
        const id = await repos.plans.insertRevision({
          farmId: input.farmId,
          weekStart: input.weekStart,
          revision,
          note: plan.note,
          subject: revisionSubject(plan.subject, revision),
          html: plan.html,
          textBody: plan.text,
          ics: plan.ics,
          createdBy: by.userId,
        })
        rev = { id, revision, created: true }
      }
      const result: PlanSendResult = { revision: rev, queued: [], alreadySent: [], optedOut: [], message: '' }
      for (const r of recipients) {
        if (r.optedOut || (await repos.plans.isOptedOut(input.farmId, r.email))) {
          result.optedOut.push(r.email)
          continue
        }
        const key = sendKey(input.farmId, input.weekStart, rev.revision, r.email, 0)
        if (await queueDelivery(repos, { id: rev.id, farmId: input.farmId }, r, key, by)) result.queued.push(r.email)
        else result.alreadySent.push(r.email)
      }
      return result
    })
  let result: PlanSendResult
  try {
    result = await run()
  } catch (error) {
    // Two sends of the same week at once: the second revision number collides; compose again.
    if (!isDuplicate(error)) throw error
    result = await run()
  }
  if (result.queued.length) wakeJobRunners()
  result.message = sendMessage(result)
  return result
}

function sendMessage(r: PlanSendResult): string {
  const parts: string[] = []
  const n = (k: number, one: string, many = `${one}s`) => `${k} ${k === 1 ? one : many}`
  if (r.queued.length) parts.push(`Revision ${r.revision.revision} is being sent to ${n(r.queued.length, 'recipient')}.`)
  if (r.alreadySent.length) {
    parts.push(
      r.queued.length
        ? `${n(r.alreadySent.length, 'recipient')} already had this revision; nothing new was sent to them.`
        : `Revision ${r.revision.revision} was already sent to ${r.alreadySent.length === 1 ? 'this recipient' : `all ${r.alreadySent.length} recipients`}; nothing new was sent. Change the note or the plan to send a new revision, or resend it from the log.`,
    )
  }
  if (r.optedOut.length) parts.push(`${n(r.optedOut.length, 'recipient')} opted out and ${r.optedOut.length === 1 ? 'was' : 'were'} skipped: ${r.optedOut.join(', ')}.`)
  return parts.join(' ') || 'Nothing was sent.'
}

/** Queues the revision again on purpose, with the next resend counter per recipient. */
export async function resendRevision(
  store: Store,
  revisionId: number,
  recipients: readonly string[],
  by: { userId: number | null },
): Promise<PlanSendResult> {
  const result = await withDeadlockRetry(store, async (repos) => {
    const rev = await repos.plans.findRevision(revisionId)
    if (!rev) throw notFound('The plan revision')
    const sends = await repos.plans.sendsOfRevision(revisionId)
    const previous = new Map<string, number | null>()
    for (const s of sends) if (!previous.has(s.recipient)) previous.set(s.recipient, s.userId)
    const wanted = recipients.length ? [...new Set(recipients.map((e) => e.toLowerCase()))] : [...previous.keys()]
    const unknown = wanted.filter((e) => !previous.has(e))
    if (unknown.length) {
      throw badRequest(`Revision ${rev.revision} was never sent to ${unknown.join(', ')}; send the plan to new addresses from the Compose tab.`, {
        recipients: `Not a recipient of this revision: ${unknown.join(', ')}`,
      })
    }
    if (wanted.length === 0) throw badRequest('This revision has no recipients to send it to again.')
    const out: PlanSendResult = { revision: { id: rev.id, revision: rev.revision, created: false }, queued: [], alreadySent: [], optedOut: [], message: '' }
    for (const email of wanted) {
      if (await repos.plans.isOptedOut(rev.farmId, email)) {
        out.optedOut.push(email)
        continue
      }
      const base = sendKey(rev.farmId, rev.weekStart, rev.revision, email, 0).replace(/s0$/, 's')
      const used = await repos.plans.keysLike(base)
      const next = Math.max(0, ...used.map((k) => Number(k.slice(base.length)) || 0)) + 1
      const key = `${base}${next}`
      if (await queueDelivery(repos, { id: rev.id, farmId: rev.farmId }, { email, userId: previous.get(email) ?? null }, key, { userId: by.userId, automatic: false })) {
        out.queued.push(email)
      }
    }
    return out
  })
  if (result.queued.length) wakeJobRunners()
  result.message = result.queued.length
    ? `Revision ${result.revision.revision} is being sent again to ${result.queued.join(', ')}.${result.optedOut.length ? ` Skipped (opted out): ${result.optedOut.join(', ')}.` : ''}`
    : `Nothing was sent again: ${result.optedOut.length ? `${result.optedOut.join(', ')} opted out.` : 'no recipients.'}`
  return result
}

// ---- the automatic weekly send ---------------------------------------------------------

/** The instant of a schedule's run in the week starting `weekStart` (farm-local weekday and time). */
export function scheduledRunMs(weekStart: string, weekday: number, localTime: string, zone: string): number {
  const [hh, mm] = localTime.split(':').map(Number)
  return DateTime.fromISO(weekStart, { zone }).plus({ days: weekday - 1 }).set({ hour: hh, minute: mm, second: 0, millisecond: 0 }).toMillis()
}

/**
 * Farms whose automatic send of the current week is due and not yet done. A server that was
 * down at the time finds the current week due once it is back; weeks before it are never
 * sent late (only the current week counts), so missed weeks do not pile up.
 */
export async function dueSchedules(repos: Repositories, nowMs: number): Promise<Array<{ farmId: number; weekStart: string }>> {
  const out: Array<{ farmId: number; weekStart: string }> = []
  for (const s of await repos.plans.enabledSchedules()) {
    const week = mondayOf(nowMs, s.timeZone)
    if (s.lastSentWeek && s.lastSentWeek >= week) continue
    if (nowMs >= scheduledRunMs(week, s.weekday, s.localTime, s.timeZone)) out.push({ farmId: s.farmId, weekStart: week })
  }
  return out
}

export const scheduleJobKey = (farmId: number, weekStart: string) => `plan-schedule:${farmId}:${weekStart}`

/** Next run of a schedule after `nowMs` (this week's if still ahead and not sent, else next week's). */
export function nextRunMs(s: { weekday: number; localTime: string; lastSentWeek: string | null }, zone: string, nowMs: number): number {
  const week = mondayOf(nowMs, zone)
  const thisWeek = scheduledRunMs(week, s.weekday, s.localTime, zone)
  if (!(s.lastSentWeek && s.lastSentWeek >= week)) return Math.max(thisWeek, nowMs)
  const next = DateTime.fromISO(week, { zone }).plus({ weeks: 1 }).toISODate()!
  return scheduledRunMs(next, s.weekday, s.localTime, zone)
}
