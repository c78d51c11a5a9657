/**
 * At-risk check of a booked pass against the stored forecast hours it covers.
 *
 * Rule: a planned or confirmed pass is at risk when any hour it covers is Closed for its
 * work type, or Tight where the work type requires Clear. A work type requires Clear
 * when it requires the one-satellite-lost (N-1) margin (`requireN1`): those are the
 * precision-critical kinds of work (planting, strip-till, tile, levelling in the demo
 * set), and Clear is exactly "meets the thresholds with that margin". Work without the
 * margin (spraying) accepts Tight hours. Hours without a stored forecast (beyond the
 * forecast's week, or not computed yet) are unknown and never make a pass at risk.
 */
import { HOUR_MS, MINUTE_MS, floorHour, localLabel } from './time'
import type { PlanningHour } from './windows'

/** Whether a work type accepts only Clear hours (see the rule above). */
export const requiresClear = (workType: { requireN1: boolean }): boolean => workType.requireN1

export interface RiskInput {
  startMs: number
  durationMin: number
  hours: readonly PlanningHour[]
  requiresClear: boolean
  workTypeName: string
  timeZone: string
}

export interface RiskResult {
  atRisk: boolean
  /** a sentence for people; null when not at risk */
  reason: string | null
  closedHourStarts: number[]
  tightHourStarts: number[]
  /** covered hours with no stored forecast */
  unknownHourStarts: number[]
}

/** The UTC hour starts a span touches. */
export function coveredHours(startMs: number, durationMin: number): number[] {
  const endMs = startMs + durationMin * MINUTE_MS
  const out: number[] = []
  for (let h = floorHour(startMs); h < endMs; h += HOUR_MS) out.push(h)
  return out
}

const MAX_REASON = 500

function listHours(starts: number[], zone: string): string {
  const shown = starts.slice(0, 4).map((ms) => localLabel(ms, zone))
  return starts.length > 4 ? `${shown.join(', ')} and ${starts.length - 4} more` : shown.join(', ')
}

/**
 * @example
 * passRisk({ startMs, durationMin: 120, hours, requiresClear: true, workTypeName: 'Planting',
 *   timeZone: 'America/Chicago' })
 * // -> { atRisk: true, reason: 'Closed for Planting: Thu 3 Dec 14:00 CST.', ... }
 */
export function passRisk(input: RiskInput): RiskResult {
  const stateAt = new Map(input.hours.map((h) => [h.startMs, h.state]))
  const closed: number[] = []
  const tight: number[] = []
  const unknown: number[] = []
  for (const h of coveredHours(input.startMs, input.durationMin)) {
    const s = stateAt.get(h)
    if (s === undefined) unknown.push(h)
    else if (s === 'closed') closed.push(h)
    else if (s === 'tight') tight.push(h)
  }
  const badTight = input.requiresClear ? tight : []
  const parts: string[] = []
  const n = (k: number) => (k === 1 ? '1 hour' : `${k} hours`)
  if (closed.length) parts.push(`${n(closed.length)} Closed for ${input.workTypeName}: ${listHours(closed, input.timeZone)}`)
  if (badTight.length) {
    parts.push(
      `${n(badTight.length)} only Tight where ${input.workTypeName} needs Clear: ${listHours(badTight, input.timeZone)}`,
    )
  }
  let reason = parts.length ? `${parts.join('; ')}.` : null
  if (reason && reason.length > MAX_REASON) reason = `${reason.slice(0, MAX_REASON - 1)}…`
  return {
    atRisk: parts.length > 0,
    reason,
    closedHourStarts: closed,
    tightHourStarts: tight,
    unknownHourStarts: unknown,
  }
}
