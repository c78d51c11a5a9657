// The space-weather part of a weekly plan: geomagnetic storm spans (G3 or worse on the NOAA
// G-scale) in the farm's stored forecast hours, as farm-local ranges, and a line when the
// Kp feed is stale or the week is not covered, so a quiet-looking plan is never a stale one.
import { DateTime } from 'luxon'
import type { Repositories } from '../db/repositories/index.ts'
import type { ForecastHourRow } from '../db/schema-planning.ts'
import { kpFeedState } from './spaceWeather.ts'

const HOUR_MS = 3_600_000

export interface PlanSpaceWeather {
  /** e.g. "Sat 5 Dec 06:00-18:00: geomagnetic storm up to G3 (Kp 7.33)" */
  storms: string[]
  /** a sentence when the feed is stale or does not reach the week's end; null otherwise */
  note: string | null
}

export async function planSpaceWeather(repos: Repositories, hours: readonly ForecastHourRow[], zone: string, nowMs: number, weekEndMs: number): Promise<PlanSpaceWeather> {
  const byHour = new Map<number, { g: number; kp: number } | null>()
  for (const r of hours) {
    try {
      const sw = r.extraJson ? (JSON.parse(r.extraJson) as { spaceWeather?: { kpMax: number; g: number } | null }).spaceWeather : undefined
      if (sw === undefined) continue
      // Fields computed at different times may disagree: the hour keeps the worst flag.
      const t = r.hourStart.getTime()
      const seen = byHour.get(t)
      if (!seen || (sw && (sw.g > seen.g || (sw.g === seen.g && sw.kpMax > seen.kp)))) byHour.set(t, sw && { g: sw.g, kp: sw.kpMax })
    } catch {
      // An unreadable extra column carries no flag.
    }
  }
  const stormHours = [...byHour.entries()].filter(([, v]) => v && v.g >= 3).sort(([a], [b]) => a - b)
  const storms: string[] = []
  let run: { start: number; end: number; g: number; kp: number } | null = null
  const flush = () => {
    if (!run) return
    const s = DateTime.fromMillis(run.start, { zone }).setLocale('en-US')
    const e = DateTime.fromMillis(run.end, { zone })
    storms.push(`${s.toFormat('ccc d LLL HH:mm')}-${e.hasSame(s, 'day') ? e.toFormat('HH:mm') : e.toFormat('ccc HH:mm')}: geomagnetic storm up to G${run.g} (Kp ${run.kp})`)
    run = null
  }
  for (const [t, v] of stormHours) {
    if (run && t === run.end) {
      run.end = t + HOUR_MS
      run.g = Math.max(run.g, v!.g)
      run.kp = Math.max(run.kp, v!.kp)
    } else {
      flush()
      run = { start: t, end: t + HOUR_MS, g: v!.g, kp: v!.kp }
    }
  }
  flush()
  const feed = kpFeedState(await repos.corrections.feedStatus(), nowMs, [...byHour.values()].some((v) => v !== null))
  let note: string | null = null
  if (feed.state === 'none') note = 'There is no space-weather (Kp) forecast yet, so storm days cannot be flagged; this is not a quiet forecast.'
  else if (feed.state === 'stale') {
    const read = feed.lastOkAt ? `last read ${DateTime.fromJSDate(feed.lastOkAt, { zone }).setLocale('en-US').toFormat('ccc d LLL HH:mm')}` : 'never read in full'
    note = `The space-weather (Kp) forecast is stale (${read}); storm days may be missing.`
  } else {
    const covered = [...byHour.entries()].filter(([, v]) => v !== null).map(([t]) => t)
    const last = covered.length ? Math.max(...covered) + HOUR_MS : null
    if (last !== null && last < weekEndMs) {
      note = `The Kp forecast reaches only 3 days ahead, to ${DateTime.fromMillis(last, { zone }).setLocale('en-US').toFormat('ccc d LLL HH:mm')}; later storms are not known yet.`
    }
  }
  return { storms, note }
}
