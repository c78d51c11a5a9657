// The API contract of passes, find-a-window, at-risk lists, an hour's detail, calendar feeds
// and the passes CSV export. Times are ISO 8601 in UTC; every pass also carries its farm's
// IANA time zone so pages and exports show farm-local times.
import { z } from 'zod'
import type { PointHourDetail } from '../precision/types'
import { idSchema } from './common'
import type { HourErrorBudget } from './corrections'
import type { HourFigures } from './forecast'

/**
 * planned (booked), confirmed (booked and agreed with the farm), started (the crew is on
 * the field), done, cancelled.
 */
export const passStatuses = ['planned', 'confirmed', 'started', 'done', 'cancelled'] as const
export type PassStatus = (typeof passStatuses)[number]
export const passStatusSchema = z.enum(passStatuses, { error: `Use one of: ${passStatuses.join(', ')}` })

/** Passes that still hold a machine (and are listed in plans and calendar feeds). */
export const activePassStatuses: readonly PassStatus[] = ['planned', 'confirmed', 'started']

/** Passes not yet under way, checked against the forecast (at risk, suggestions). */
export const upcomingPassStatuses: readonly PassStatus[] = ['planned', 'confirmed']

const isoTime = z.iso.datetime({ offset: true, error: 'Use an ISO 8601 time such as 2026-12-03T14:00:00Z' })

/** Durations: 15 min steps are not enforced for typed values, only for estimates. */
export const durationMinSchema = z
  .number()
  .int('Use whole minutes')
  .min(15, 'A pass lasts at least 15 minutes')
  .max(7 * 24 * 60, 'A pass lasts at most 7 days')

const notesSchema = z.string().trim().max(4000, 'Use at most 4000 characters')

/** POST /api/passes. Without durationMin the server estimates it from area and work rate. */
export const passInputSchema = z.object({
  fieldId: z.number().int().positive(),
  workTypeId: z.number().int().positive(),
  machineId: z.number().int().positive().nullable().default(null),
  start: isoTime,
  durationMin: durationMinSchema.optional(),
  status: z.enum(['planned', 'confirmed'], { error: 'A new pass is planned or confirmed' }).default('planned'),
  notes: notesSchema.default(''),
})
export type PassInput = z.infer<typeof passInputSchema>

/**
 * PATCH /api/passes/:id: only what is sent changes. `durationMin: null` asks for a new
 * estimate (after a change of machine or work type).
 */
export const passPatchSchema = z.object({
  fieldId: z.number().int().positive().optional(),
  workTypeId: z.number().int().positive().optional(),
  machineId: z.number().int().positive().nullable().optional(),
  start: isoTime.optional(),
  durationMin: durationMinSchema.nullable().optional(),
  status: passStatusSchema.optional(),
  notes: notesSchema.optional(),
  /** the version the change was made from: 409 when the pass has changed since */
  version: z.number().int().positive().optional(),
})
export type PassPatch = z.infer<typeof passPatchSchema>

export interface Pass {
  id: number
  farmId: number
  farmName: string
  /** IANA zone of the farm, for local times */
  timeZone: string
  fieldId: number
  fieldName: string
  fieldAreaHa: number
  workTypeId: number
  workTypeName: string
  /** the work type wants Clear hours (its N-1 margin is required); otherwise Tight is accepted */
  requiresClear: boolean
  machineId: number | null
  machineName: string | null
  crew: string | null
  /** UTC ISO start and end (end = start + duration) */
  start: string
  end: string
  durationMin: number
  status: PassStatus
  /** when and by whom the status was last set (null for passes older than that record) */
  statusChangedAt: string | null
  statusChangedBy: number | null
  statusChangedByName: string | null
  /** bumped by every change a person makes; send it back to refuse a change made from an older copy */
  version: number
  atRisk: boolean
  atRiskReason: string | null
  /** start of the best window for the same work, duration and machine when at risk */
  suggestedStart: string | null
  notes: string
  createdBy: number | null
  createdAt: string
  updatedAt: string
}

const statusList = z
  .string()
  .trim()
  .transform((v) => v.split(',').map((s) => s.trim()).filter(Boolean))
  .pipe(z.array(passStatusSchema).min(1, 'Name at least one status'))

/** GET /api/passes: filters; from/to select passes overlapping [from, to). */
export const passListQuerySchema = z
  .object({
    farmId: idSchema.optional(),
    fieldId: idSchema.optional(),
    machineId: idSchema.optional(),
    from: isoTime.optional(),
    to: isoTime.optional(),
    /** one status or a comma-separated list, e.g. planned,confirmed */
    status: statusList.optional(),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.to) > Date.parse(q.from), {
    message: 'to must be after from',
    path: ['to'],
  })
export type PassListQuery = z.infer<typeof passListQuerySchema>

/** GET /api/passes/at-risk */
export const atRiskQuerySchema = z.object({ farmId: idSchema.optional() })
export type AtRiskQuery = z.infer<typeof atRiskQuerySchema>

/** GET /api/passes.csv: a week (or any span up to 92 days) of passes of one farm. */
export const passCsvQuerySchema = z
  .object({
    farmId: idSchema,
    from: isoTime,
    to: isoTime,
  })
  .refine((q) => Date.parse(q.to) > Date.parse(q.from), { message: 'to must be after from', path: ['to'] })
  .refine((q) => Date.parse(q.to) - Date.parse(q.from) <= 92 * 86_400_000, {
    message: 'Export at most 92 days at a time',
    path: ['to'],
  })
export type PassCsvQuery = z.infer<typeof passCsvQuerySchema>

const flag = z.enum(['0', '1', 'true', 'false'], { error: 'Use 0 or 1' }).transform((v) => v === '1' || v === 'true')

/** GET /api/fields/:id/windows */
export const windowQuerySchema = z.object({
  workTypeId: idSchema,
  /** estimated from the field's area and the work rate when left out */
  durationMin: z.coerce.number().pipe(durationMinSchema).optional(),
  machineId: idSchema.optional(),
  /** night hours (sun below the horizon at the field's centroid) allowed; default 0 */
  allowNight: flag.default(false),
  /** search span; default the coming week (next full hour to 7 days later) */
  from: isoTime.optional(),
  to: isoTime.optional(),
  /** how many windows, default 5 */
  limit: z.coerce.number().int().min(1).max(20).default(5),
})
export type WindowQuery = z.infer<typeof windowQuerySchema>

/** One proposed window. The list is ranked: all Clear first, then fewest Tight, then earliest. */
export interface PlanningWindow {
  start: string
  end: string
  /** the same in the farm's zone, 'YYYY-MM-DD HH:mm' */
  localStart: string
  localEnd: string
  clearHours: number
  tightHours: number
  /** share (0..1) of the window's hours that are Clear; 1 = every hour Clear */
  score: number
}

export interface WindowSearchResult {
  fieldId: number
  workTypeId: number
  machineId: number | null
  durationMin: number
  /** true when durationMin was estimated from area and work rate */
  durationEstimated: boolean
  allowNight: boolean
  timeZone: string
  from: string
  to: string
  /** forecast hours stored for the field inside the span (0: no forecast yet) */
  forecastHours: number
  windows: PlanningWindow[]
}

/** GET /api/fields/:id/hour-detail */
export const hourDetailQuerySchema = z.object({ hour: isoTime })
export type HourDetailQuery = z.infer<typeof hourDetailQuerySchema>

export interface HourWorkState {
  workTypeId: number
  workTypeName: string
  share: number
  shareN1: number
  state: 'clear' | 'tight' | 'closed'
  /** why the state is worse than the geometry (corrections.ts) */
  reason?: 'no-source' | 'out-of-range' | 'baseline-limit' | 'storm'
}

/** The stored figures of one forecast hour (null: no fix or not computed). */
export type StoredHourFigures = HourFigures & {
  hourStart: string
  workTypes: HourWorkState[]
  orbitSummary: string
  computedAt: string
}

/** A sample point of the hour detail: the engine's figures of the point (PointHourDetail), its work types by id. */
export type HourDetailPoint = Omit<PointHourDetail, 'workTypes'> & {
  workTypes: Array<Omit<PointHourDetail['workTypes'][number], 'id'> & { workTypeId: number }>
}

export interface HourDetailSkySatellite {
  id: string
  system: string
  azimuthDeg: number
  elevationDeg: number
  status: 'used' | 'below-mask' | 'behind-obstruction' | 'behind-terrain' | 'outage' | 'unknown-position'
  track: Array<{ tMs: number; azimuthDeg: number; elevationDeg: number }>
}

export interface HourDetail {
  fieldId: number
  fieldName: string
  timeZone: string
  hourStart: string
  /** what the forecast job stored for this hour; null when nothing is stored */
  stored: StoredHourFigures | null
  /** geometry x sigma, the baseline part and the space weather of the hour (corrections.ts) */
  errorBudget: HourErrorBudget
  /** computed now with the active orbit data, outages and the farm's obstructions */
  computed: {
    orbitSummary: string
    sigmaUereM: number
    points: HourDetailPoint[]
    /** the sample point with the highest HDOP (no fix counts as worst) */
    worstPoint: { latDeg: number; lonDeg: number; index: number }
    sky: {
      atMs: number
      maskDeg: number
      horizonMaskDeg: number[]
      /** the terrain's horizon (deg, 360 entries), null without an elevation model */
      terrainHorizonDeg: number[] | null
      satellites: HourDetailSkySatellite[]
      used: string[]
      dop: { gdop: number; pdop: number; hdop: number; vdop: number; tdop: number } | null
      n1: { lostSatId: string; hdop: number | null } | null
    }
  }
}

/** POST /api/farms/:id/calendar-tokens */
export const calendarTokenInputSchema = z.object({
  label: z.string().trim().max(120, 'Use at most 120 characters').default(''),
  /** also publish the Clear windows per work type as free (transparent) events */
  includeWindows: z.boolean().default(false),
})
export type CalendarTokenInput = z.infer<typeof calendarTokenInputSchema>

export interface CalendarToken {
  id: number
  farmId: number
  label: string
  includeWindows: boolean
  createdBy: number | null
  createdByName: string | null
  createdAt: string
  revokedAt: string | null
}

/** Returned once, at creation: the plain token and the feed address are never shown again. */
export interface CreatedCalendarToken extends CalendarToken {
  token: string
  url: string
}

/**
 * POST /api/passes/:id/status: the crew (or the office) marks a pass started, done,
 * planned again or cancelled, optionally with a note. With `version`, the change is
 * refused (409) when the pass has changed since that version was read, e.g. a change
 * queued in a cab without signal.
 */
export const passStatusChangeSchema = z.object({
  status: passStatusSchema,
  version: z.number().int().positive().optional(),
  note: z.string().trim().max(1000, 'Use at most 1000 characters').default(''),
})
export type PassStatusChange = z.infer<typeof passStatusChangeSchema>

/** POST /api/passes/:id/notes: a note from the field, added to the pass's notes. */
export const passNoteSchema = z.object({
  text: z.string().trim().min(1, 'Write the note').max(1000, 'Use at most 1000 characters'),
  version: z.number().int().positive().optional(),
})
export type PassNote = z.infer<typeof passNoteSchema>
