// The weekly plan jobs: 'plan-send' delivers one plan_sends row (one recipient) through the
// mailer, 'plan-schedule' runs a farm's automatic weekly send, and a timer in each process
// that runs jobs looks once a minute for schedules that are due.
//
// A delivery is sent at most once: the handler reads the row first and does nothing when it
// is already 'sent'; the Message-ID is derived from the idempotency key, recorded with the
// row once the SMTP server accepted the message. An SMTP failure is recorded on the row and
// rethrown, so the runner retries with its backoff; the last attempt marks the row 'failed'.
import { createHash } from 'node:crypto'
import type { Store } from '../db/repositories/index.ts'
import type { Logger } from '../logger.ts'
import { finalizePlanBody } from '../mail/planTemplate.ts'
import type { Mailer } from '../mail/transport.ts'
import {
  dueSchedules,
  icsFilenameOf,
  optOutUrl,
  PLAN_SCHEDULE_KIND,
  PLAN_SEND_KIND,
  scheduleJobKey,
  sendPlan,
} from '../services/plansCompose.ts'
import { enqueueJob } from '../queue/enqueue.ts'
import { errorText, type JobHandler } from './runner.ts'

/** The Message-ID of a delivery: stable for its idempotency key. */
export const planMessageId = (idempotencyKey: string) =>
  `<plan.${createHash('sha256').update(idempotencyKey).digest('hex').slice(0, 40)}@skyfurrow.mail>`

export function planJobHandlers(deps: { mailer: Mailer }): Record<string, JobHandler> {
  const planSend: JobHandler = async (ctx) => {
    const { store, config, job } = ctx
    const repos = store.repos
    const sendId = Number(ctx.payload.sendId)
    if (!Number.isInteger(sendId)) throw new Error('A plan-send job needs a sendId.')
    const send = await repos.plans.findSend(sendId)
    if (!send) return { summary: 'The delivery no longer exists; nothing sent.' }
    if (send.status === 'sent') return { summary: `Already sent to ${send.recipient} (${send.messageId}); nothing sent again.` }
    if (send.status === 'opted-out') return { summary: `${send.recipient} opted out; nothing sent.` }
    const rev = await repos.plans.findRevision(send.revisionId)
    if (!rev) return { summary: 'The plan revision no longer exists; nothing sent.' }
    if (await repos.plans.isOptedOut(rev.farmId, send.recipient)) {
      await repos.plans.markOptedOut(send.id)
      return { summary: `${send.recipient} opted out before the delivery; nothing sent.` }
    }
    const user = send.userId ? await repos.users.findById(send.userId) : null
    const fill = { units: user?.units ?? 'metric', optOutUrl: optOutUrl(config, rev.farmId, send.recipient) } as const
    const messageId = planMessageId(send.idempotencyKey)
    await repos.plans.markSending(send.id)
    try {
      await deps.mailer.send({
        to: send.recipient,
        subject: rev.subject,
        html: finalizePlanBody(rev.html, { ...fill, html: true }),
        text: finalizePlanBody(rev.textBody, { ...fill, html: false }),
        attachments: [{ filename: icsFilenameOf(rev.farmName, rev.weekStart), content: rev.ics, contentType: 'text/calendar; charset=utf-8; method=PUBLISH' }],
        messageId,
      })
    } catch (error) {
      await repos.plans.markError(send.id, errorText(error), job.attempts >= job.maxAttempts)
      throw error
    }
    await repos.plans.markSent(send.id, messageId, new Date())
    return { summary: `Plan ${rev.weekStart} revision ${rev.revision} of ${rev.farmName} sent to ${send.recipient}.`, data: { sendId: send.id, messageId } }
  }

  const planSchedule: JobHandler = async (ctx) => {
    const { store } = ctx
    const farmId = Number(ctx.payload.farmId)
    const weekStart = String(ctx.payload.weekStart ?? '')
    const schedule = await store.repos.plans.schedule(farmId)
    if (!schedule || !schedule.enabled) return { summary: 'The automatic send was switched off; nothing sent.' }
    if (schedule.lastSentWeek && schedule.lastSentWeek >= weekStart) return { summary: `The plan of ${weekStart} was already sent automatically.` }
    // The office's note of the week's latest revision stays at the top of the automatic plan.
    const latest = await store.repos.plans.latestRevision(farmId, weekStart)
    const result = await sendPlan(store, { farmId, weekStart, note: latest?.note ?? '', extraRecipients: [] }, { userId: null, automatic: true }).catch(
      (error: unknown) => {
        // No client to send to is not worth retrying: the week counts as done.
        if ((error as { status?: number }).status === 400) return null
        throw error
      },
    )
    await store.repos.plans.setLastSentWeek(farmId, weekStart)
    if (!result) return { summary: `No recipients for the automatic plan of ${weekStart}; nothing sent.` }
    return { summary: `Automatic plan of ${weekStart}: ${result.message}`, data: { queued: result.queued.length, revision: result.revision.revision } }
  }

  return { [PLAN_SEND_KIND]: planSend, [PLAN_SCHEDULE_KIND]: planSchedule }
}

/** Queues the automatic send of every farm that is due (one job per farm and week, ever). */
export async function checkPlanSchedules(store: Store, nowMs = Date.now()): Promise<number> {
  let queued = 0
  for (const due of await dueSchedules(store.repos, nowMs)) {
    const { created } = await enqueueJob(
      store,
      { kind: PLAN_SCHEDULE_KIND, farmId: due.farmId, dedupeKey: scheduleJobKey(due.farmId, due.weekStart), payload: due, maxAttempts: 4 },
      'once',
    )
    if (created) queued++
  }
  return queued
}

/** Checks the schedules now and then every `everyMs`; returns a stop function. */
export function startPlanScheduler(deps: { store: Store; logger: Logger; everyMs?: number }): () => void {
  const check = () =>
    void checkPlanSchedules(deps.store)
      .then((n) => {
        if (n) deps.logger.info(`automatic weekly plans: ${n} farm${n === 1 ? '' : 's'} queued`)
      })
      .catch((error) => deps.logger.warn('checking the automatic weekly plans failed', error))
  check()
  const timer = setInterval(check, deps.everyMs ?? 60_000)
  timer.unref()
  return () => clearInterval(timer)
}
