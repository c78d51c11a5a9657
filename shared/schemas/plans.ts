// Weekly plan e-mails: compose and preview a farm's plan for a week, send it (jobs, one per
// recipient), the send log, the automatic weekly send and recipients' opt-outs.
import { z } from 'zod'
import { idSchema, unitSystemSchema, type UnitSystem } from './common'

/** A calendar date 'YYYY-MM-DD' that is a Monday (the plan week's first day in the farm's zone). */
export const weekStartSchema = z
  .string()
  .trim()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Give the week as its Monday, YYYY-MM-DD')
  .refine((v) => {
    const d = new Date(`${v}T00:00:00Z`)
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === v
  }, 'Not a calendar date')
  .refine((v) => new Date(`${v}T00:00:00Z`).getUTCDay() === 1, 'The week must start on a Monday')

export const PLAN_NOTE_MAX = 4000
export const PLAN_EXTRA_RECIPIENTS_MAX = 50

export const planKeySchema = z.object({ farmId: idSchema, weekStart: weekStartSchema })
export type PlanKey = z.infer<typeof planKeySchema>

export const planPreviewSchema = planKeySchema.extend({
  note: z.string().max(PLAN_NOTE_MAX, `The note may have at most ${PLAN_NOTE_MAX} characters`).default(''),
  units: unitSystemSchema.default('metric'),
  /** Preview as this recipient gets it: their units and their own opt-out link. */
  recipient: z.string().trim().toLowerCase().max(254).optional(),
})
export type PlanPreviewInput = z.input<typeof planPreviewSchema>

/**
 * Extra addresses are checked one by one on the server, so the error names the bad one;
 * here only the shape (a list of strings) is fixed.
 */
export const planSendSchema = planKeySchema.extend({
  note: z.string().max(PLAN_NOTE_MAX, `The note may have at most ${PLAN_NOTE_MAX} characters`).default(''),
  extraRecipients: z
    .array(z.string().max(320))
    .max(PLAN_EXTRA_RECIPIENTS_MAX, `At most ${PLAN_EXTRA_RECIPIENTS_MAX} extra addresses`)
    .default([]),
})
export type PlanSendInput = z.input<typeof planSendSchema>

export const planResendSchema = z.object({
  /** Must be true: a resend delivers the revision again on purpose. */
  confirm: z.literal(true, { error: 'Confirm the resend (confirm: true)' }),
  /** Recipients of the revision to send to again; empty or missing: everyone it was sent to. */
  recipients: z.array(z.string().trim().toLowerCase().max(254)).max(200).default([]),
})
export type PlanResendInput = z.input<typeof planResendSchema>

export const planLogQuerySchema = z.object({
  farmId: idSchema.optional(),
  weekStart: weekStartSchema.optional(),
})
export type PlanLogQuery = z.output<typeof planLogQuerySchema>

export const planScheduleInputSchema = z.object({
  enabled: z.boolean(),
  weekday: z.number().int().min(1, 'Weekday is 1 (Monday) to 7 (Sunday)').max(7, 'Weekday is 1 (Monday) to 7 (Sunday)'),
  localTime: z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Give the time as HH:MM (24 h), e.g. 07:00'),
})
export type PlanScheduleInput = z.infer<typeof planScheduleInputSchema>

export const optOutTokenSchema = z.object({ token: z.string().trim().min(10).max(600) })

export const planSendStatuses = ['queued', 'sent', 'failed', 'opted-out'] as const
export type PlanSendStatus = (typeof planSendStatuses)[number]

export interface PlanRecipient {
  email: string
  name: string | null
  userId: number | null
  units: UnitSystem
  /** 'client': a client user linked to the farm; 'extra': typed in for this send. */
  kind: 'client' | 'extra'
  optedOut: boolean
}

export interface PlanEvent {
  uid: string
  summary: string
  startAt: string
  endAt: string
  description: string
}

export interface PlanPreview {
  farmId: number
  farmName: string
  timeZone: string
  weekStart: string
  subject: string
  html: string
  text: string
  ics: string
  icsFilename: string
  events: PlanEvent[]
  recipients: PlanRecipient[]
  /** The latest stored revision of this farm and week, and whether this preview differs from it. */
  latestRevision: { id: number; revision: number; createdAt: string } | null
  changedSinceLatest: boolean
  counts: { passes: number; atRisk: number; fields: number }
}

export interface PlanSendRow {
  id: number
  revisionId: number
  farmId: number
  farmName: string
  weekStart: string
  revision: number
  recipient: string
  status: PlanSendStatus
  messageId: string | null
  error: string | null
  attempts: number
  automatic: boolean
  sentBy: number | null
  sentByName: string | null
  resend: number
  createdAt: string
  sentAt: string | null
}

export interface PlanSendResult {
  revision: { id: number; revision: number; created: boolean }
  /** Recipients a delivery was queued for now. */
  queued: string[]
  /** Recipients this revision had already been sent (or queued) to: nothing new. */
  alreadySent: string[]
  /** Recipients who opted out of this farm's plans. */
  optedOut: string[]
  message: string
}

export interface PlanRevisionDetail {
  id: number
  farmId: number
  farmName: string
  weekStart: string
  revision: number
  note: string
  subject: string
  createdAt: string
  createdByName: string | null
  /** The message as a given recipient received it (units and opt-out link filled in). */
  recipient: string | null
  html: string
  text: string
  ics: string
  sends: PlanSendRow[]
}

export interface PlanSchedule {
  farmId: number
  enabled: boolean
  weekday: number
  localTime: string
  lastSentWeek: string | null
  timeZone: string
  /** The next automatic send (ISO instant), when enabled. */
  nextRunAt: string | null
}

export interface PlanOptOut {
  farmId: number
  email: string
  optedOutAt: string
}

export interface PlanWeekOption {
  weekStart: string
  label: string
}
