// Weekly plans for the office: preview a farm's plan for a week as each recipient will
// read it, send it (deliveries are jobs), the send log, a sent revision as it was sent,
// resends on purpose, the automatic weekly send's settings and the opt-outs. The public
// opt-out link needs no session: its token is signed (plansCompose.ts).
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type {
  PlanOptOut,
  PlanPreview,
  PlanRevisionDetail,
  PlanSchedule,
  PlanScheduleInput,
  PlanSendResult,
  PlanSendRow,
  PlanWeekOption,
} from '../../shared/schemas/plans.ts'
import type { UnitSystem } from '../../shared/schemas/common.ts'
import { assertRole } from '../auth/access.ts'
import type { PlanSendListRow } from '../db/repositories/plans.ts'
import { badRequest, notFound } from '../http/errors.ts'
import { finalizePlanBody, revisionSubject } from '../mail/planTemplate.ts'
import type { ServiceContext } from './context.ts'
import {
  composePlan,
  mondayOf,
  nextRunMs,
  optOutUrl,
  planRecipients,
  readOptOutToken,
  resendRevision,
  sameContent,
  scheduledRunMs,
  sendPlan,
  weekLabel,
} from './plansCompose.ts'

const staff = (user: SessionUser) => assertRole(user, 'admin', 'office')

/** The resend counter of an idempotency key ('…:s2' -> 2). */
const resendOf = (key: string) => Number(/:s(\d+)$/.exec(key)?.[1] ?? 0)

export function toSendRow(r: PlanSendListRow): PlanSendRow {
  return {
    id: r.id,
    revisionId: r.revisionId,
    farmId: r.farmId,
    farmName: r.farmName,
    weekStart: r.weekStart,
    revision: r.revision,
    recipient: r.recipient,
    status: r.status,
    messageId: r.messageId,
    error: r.error,
    attempts: r.attempts,
    automatic: r.automatic,
    sentBy: r.sentBy,
    sentByName: r.sentByName,
    resend: resendOf(r.idempotencyKey),
    createdAt: r.createdAt.toISOString(),
    sentAt: r.sentAt?.toISOString() ?? null,
  }
}

export function createPlansService(ctx: ServiceContext) {
  const { store, config } = ctx
  const repos = store.repos

  async function farmOrThrow(farmId: number) {
    const farm = await repos.farms.findById(farmId)
    if (!farm) throw notFound('The farm')
    return farm
  }

  return {
    /** The current week and the next three, as Mondays in the farm's zone. */
    async weeks(user: SessionUser, farmId: number, nowMs = Date.now()): Promise<PlanWeekOption[]> {
      staff(user)
      const farm = await farmOrThrow(farmId)
      const first = mondayOf(nowMs, farm.timeZone)
      const out: PlanWeekOption[] = []
      for (let i = -1; i < 4; i++) {
        const d = new Date(`${first}T00:00:00Z`)
        d.setUTCDate(d.getUTCDate() + 7 * i)
        const weekStart = d.toISOString().slice(0, 10)
        out.push({ weekStart, label: `${weekLabel(weekStart, farm.timeZone)}${i === 0 ? ' (this week)' : i === 1 ? ' (next week)' : ''}` })
      }
      return out
    },

    async preview(
      user: SessionUser,
      input: { farmId: number; weekStart: string; note: string; units: UnitSystem; recipient?: string; extraRecipients?: string[] },
    ): Promise<PlanPreview> {
      staff(user)
      const plan = await composePlan(repos, input.farmId, input.weekStart, input.note)
      const recipients = await planRecipients(repos, input.farmId, input.extraRecipients ?? [])
      const latest = await repos.plans.latestRevision(input.farmId, input.weekStart)
      const unchanged = latest !== null && sameContent(latest, plan)
      // As the chosen recipient gets it (their units, their opt-out link); without one, in the
      // given units with the link of the first recipient in those units.
      const chosen = recipients.find((r) => r.email === input.recipient)
      const sample = chosen?.email ?? recipients.find((r) => r.units === input.units)?.email ?? recipients[0]?.email ?? 'recipient@example.test'
      const fill = { units: chosen?.units ?? input.units, optOutUrl: optOutUrl(config, input.farmId, sample) }
      return {
        farmId: plan.farm.id,
        farmName: plan.farm.name,
        timeZone: plan.farm.timeZone,
        weekStart: plan.weekStart,
        // As it will be sent: the latest revision again when nothing changed, else the next.
        subject: revisionSubject(plan.subject, unchanged ? latest.revision : (latest?.revision ?? 0) + 1),
        html: finalizePlanBody(plan.html, { ...fill, html: true }),
        text: finalizePlanBody(plan.text, { ...fill, html: false }),
        ics: plan.ics,
        icsFilename: plan.icsFilename,
        events: plan.events,
        recipients,
        latestRevision: latest ? { id: latest.id, revision: latest.revision, createdAt: latest.createdAt.toISOString() } : null,
        changedSinceLatest: !unchanged,
        counts: plan.counts,
      }
    },

    async send(user: SessionUser, input: { farmId: number; weekStart: string; note: string; extraRecipients: string[] }): Promise<PlanSendResult> {
      staff(user)
      await farmOrThrow(input.farmId)
      return sendPlan(store, input, { userId: user.id, automatic: false })
    },

    async resend(user: SessionUser, revisionId: number, recipients: string[]): Promise<PlanSendResult> {
      staff(user)
      return resendRevision(store, revisionId, recipients, { userId: user.id })
    },

    async log(user: SessionUser, query: { farmId?: number; weekStart?: string }): Promise<PlanSendRow[]> {
      staff(user)
      return (await repos.plans.listSends({ farmId: query.farmId, weekStart: query.weekStart })).map(toSendRow)
    },

    /** A stored revision; with `recipient`, the message exactly as that recipient got it. */
    async revision(user: SessionUser, id: number, recipient?: string): Promise<PlanRevisionDetail> {
      staff(user)
      const rev = await repos.plans.findRevision(id)
      if (!rev) throw notFound('The plan revision')
      const sends = await repos.plans.sendsOfRevision(id)
      const who = recipient?.toLowerCase() ?? sends[0]?.recipient ?? null
      if (recipient && !sends.some((s) => s.recipient === who)) {
        throw badRequest(`Revision ${rev.revision} was not sent to ${recipient}.`, { recipient: 'Not a recipient of this revision' })
      }
      let units: UnitSystem = 'metric'
      const send = sends.find((s) => s.recipient === who)
      if (send?.userId) units = (await repos.users.findById(send.userId))?.units ?? 'metric'
      const fill = { units, optOutUrl: optOutUrl(config, rev.farmId, who ?? 'recipient@example.test') }
      return {
        id: rev.id,
        farmId: rev.farmId,
        farmName: rev.farmName,
        weekStart: rev.weekStart,
        revision: rev.revision,
        note: rev.note,
        subject: rev.subject,
        createdAt: rev.createdAt.toISOString(),
        createdByName: rev.createdByName,
        recipient: who,
        html: finalizePlanBody(rev.html, { ...fill, html: true }),
        text: finalizePlanBody(rev.textBody, { ...fill, html: false }),
        ics: rev.ics,
        sends: sends.map(toSendRow),
      }
    },

    async schedule(user: SessionUser, farmId: number, nowMs = Date.now()): Promise<PlanSchedule> {
      staff(user)
      const farm = await farmOrThrow(farmId)
      const row = (await repos.plans.schedule(farmId)) ?? { farmId, enabled: false, weekday: 1, localTime: '07:00', lastSentWeek: null }
      return {
        farmId,
        enabled: row.enabled,
        weekday: row.weekday,
        localTime: row.localTime,
        lastSentWeek: row.lastSentWeek,
        timeZone: farm.timeZone,
        nextRunAt: row.enabled ? new Date(nextRunMs(row, farm.timeZone, nowMs)).toISOString() : null,
      }
    },

    async setSchedule(user: SessionUser, farmId: number, input: PlanScheduleInput): Promise<PlanSchedule> {
      staff(user)
      const farm = await farmOrThrow(farmId)
      const before = await repos.plans.schedule(farmId)
      await repos.plans.upsertSchedule(farmId, input)
      // Switched on after this week's time has passed: the first automatic send is next week's
      // (the current week is sent from the Compose tab), not an unexpected send right now.
      const nowMs = Date.now()
      const week = mondayOf(nowMs, farm.timeZone)
      if (input.enabled && !before?.enabled && nowMs >= scheduledRunMs(week, input.weekday, input.localTime, farm.timeZone)) {
        if (!before?.lastSentWeek || before.lastSentWeek < week) await repos.plans.setLastSentWeek(farmId, week)
      }
      return this.schedule(user, farmId, nowMs)
    },

    async optOuts(user: SessionUser, farmId: number): Promise<PlanOptOut[]> {
      staff(user)
      await farmOrThrow(farmId)
      return (await repos.plans.optOuts(farmId)).map((o) => ({ farmId: o.farmId, email: o.email, optedOutAt: o.optedOutAt.toISOString() }))
    },

    /** Takes an address back in (someone who asked to receive the plans again). */
    async reinclude(user: SessionUser, farmId: number, email: string): Promise<void> {
      staff(user)
      await farmOrThrow(farmId)
      if (!(await repos.plans.removeOptOut(farmId, email))) throw notFound(`An opt-out of ${email}`)
    },

    /** What a valid opt-out token stands for (public). */
    async optOutInfo(token: string): Promise<{ farmId: number; farmName: string; email: string; optedOut: boolean }> {
      const data = readOptOutToken(config.planLinkSecret, token)
      if (!data) throw badRequest('This opt-out link is not valid. Copy the whole link from the e-mail, or ask the office.', { token: 'Not a valid link' })
      const farm = await repos.farms.findById(data.farmId)
      if (!farm) throw notFound('The farm')
      return { farmId: farm.id, farmName: farm.name, email: data.email, optedOut: await repos.plans.isOptedOut(farm.id, data.email) }
    },

    async optOut(token: string): Promise<{ farmId: number; farmName: string; email: string; optedOut: boolean }> {
      const info = await this.optOutInfo(token)
      await repos.plans.addOptOut(info.farmId, info.email)
      return { ...info, optedOut: true }
    },
  }
}
export type PlansService = ReturnType<typeof createPlansService>
