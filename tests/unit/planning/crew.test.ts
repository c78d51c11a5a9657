// The cab view's reading of a field's hours: open now, until when, or when it opens.
// Rules (product design, hour states): Clear hours carry every work type, Tight hours only
// work that does not need Clear, Closed and unknown hours none. Daylight by default (the
// product's rule, as the window finder's day-only default): a night hour carries no work
// unless the pass itself is planned in night hours.
import SunCalc from 'suncalc'
import { describe, expect, it } from 'vitest'
import {
  HOUR_MS,
  nightFlagged,
  openSpan,
  plannedAtNight,
  type CrewReadingHour,
} from '../../../shared/planning/index.ts'

const t0 = Date.UTC(2026, 11, 3, 14)
/** One hour per letter from t0 (C clear, T tight, X closed); `nights` marks night hours with n. */
const hours = (letters: string, nights = ''): CrewReadingHour[] =>
  [...letters].map((c, i) => ({
    startMs: t0 + i * HOUR_MS,
    state: c === 'C' ? 'clear' : c === 'T' ? 'tight' : 'closed',
    night: nights[i] === 'n',
  }))
const strict = { requiresClear: true }
const loose = { requiresClear: false }

describe('openSpan by the forecast', () => {
  it('closes at the end of the last workable hour of the run that holds now', () => {
    expect(openSpan(hours('CCTX'), t0 + 10 * 60_000, strict)).toEqual({
      stateNow: 'clear',
      nightNow: false,
      openNow: true,
      closesAtMs: t0 + 2 * HOUR_MS,
      closesWithDaylight: false,
      opensAtMs: null,
      opensWithDaylight: false,
    })
    // Tight hours carry work that does not need Clear.
    expect(openSpan(hours('CCTX'), t0 + 10 * 60_000, loose).closesAtMs).toBe(t0 + 3 * HOUR_MS)
  })

  it('says when a closed window opens next, and nothing when no hour is workable', () => {
    expect(openSpan(hours('XXTC'), t0, strict)).toMatchObject({ stateNow: 'closed', openNow: false, closesAtMs: null, opensAtMs: t0 + 3 * HOUR_MS })
    expect(openSpan(hours('XXTC'), t0, loose).opensAtMs).toBe(t0 + 2 * HOUR_MS)
    expect(openSpan(hours('XX'), t0, loose)).toMatchObject({ stateNow: 'closed', openNow: false, closesAtMs: null, opensAtMs: null })
  })

  it('treats an hour without a stored forecast as not workable (a gap closes the window)', () => {
    const gap = hours('CCCC').filter((_, i) => i !== 2)
    expect(openSpan(gap, t0, strict).closesAtMs).toBe(t0 + 2 * HOUR_MS)
    expect(openSpan(gap, t0 - HOUR_MS, strict)).toMatchObject({ stateNow: null, openNow: false, opensAtMs: t0 })
  })
})

describe('openSpan with night hours', () => {
  it('closes a daylight window with the daylight: a Clear night hour carries no work', () => {
    expect(openSpan(hours('CCCCC', '..nnn'), t0, strict)).toMatchObject({
      openNow: true,
      closesAtMs: t0 + 2 * HOUR_MS,
      closesWithDaylight: true,
    })
    // The forecast closing the window first is the forecast's doing, not the night's.
    expect(openSpan(hours('CXCCC', '..nnn'), t0, strict)).toMatchObject({ closesAtMs: t0 + HOUR_MS, closesWithDaylight: false })
    // A Closed night hour right after the run: the night ends the window all the same.
    expect(openSpan(hours('CCXXX', '..nnn'), t0, strict)).toMatchObject({ closesAtMs: t0 + 2 * HOUR_MS, closesWithDaylight: true })
  })

  it('at night, keeps the forecast state of the hour but opens with the first day hour', () => {
    const evening = hours('CCCCCC', 'nnn...')
    expect(openSpan(evening, t0 + 5 * 60_000, strict)).toEqual({
      stateNow: 'clear',
      nightNow: true,
      openNow: false,
      closesAtMs: null,
      closesWithDaylight: false,
      opensAtMs: t0 + 3 * HOUR_MS,
      opensWithDaylight: true,
    })
    // A first day hour that is Closed: the window opens later, by the forecast.
    expect(openSpan(hours('CCCXXC', 'nnn...'), t0, strict)).toMatchObject({ nightNow: true, opensAtMs: t0 + 5 * HOUR_MS, opensWithDaylight: false })
    // Tight night hours are not workable either, for any work type.
    expect(openSpan(hours('TTTC', 'nnn.'), t0, loose)).toMatchObject({ openNow: false, opensAtMs: t0 + 3 * HOUR_MS })
  })

  it('counts night hours like day hours for a pass planned in night hours', () => {
    const night = { requiresClear: true, nightWork: true }
    expect(openSpan(hours('CCCCX', '..nnn'), t0, night)).toMatchObject({ nightNow: false, closesAtMs: t0 + 4 * HOUR_MS, closesWithDaylight: false })
    expect(openSpan(hours('XCC', 'nnn'), t0, night)).toMatchObject({ nightNow: false, openNow: false, opensAtMs: t0 + HOUR_MS, opensWithDaylight: false })
  })

  it('reads an hour without a night flag as a day hour (as before the flag existed)', () => {
    const unflagged = hours('CCX').map(({ startMs, state }) => ({ startMs, state }))
    expect(openSpan(unflagged, t0, strict)).toMatchObject({ openNow: true, closesAtMs: t0 + 2 * HOUR_MS, closesWithDaylight: false })
  })
})

describe('plannedAtNight', () => {
  const evening = hours('CCCC', '..nn')
  it('is true when the pass touches a stored night hour, even by part of it', () => {
    expect(plannedAtNight(evening, t0, t0 + 2 * HOUR_MS)).toBe(false)
    expect(plannedAtNight(evening, t0 + HOUR_MS, t0 + 2 * HOUR_MS + 60_000)).toBe(true)
    expect(plannedAtNight(evening, t0 + 3 * HOUR_MS, t0 + 5 * HOUR_MS)).toBe(true)
    // Hours outside the stored forecast say nothing about the night.
    expect(plannedAtNight(evening, t0 + 6 * HOUR_MS, t0 + 8 * HOUR_MS)).toBe(false)
  })
})

describe('night flags at a known place and date', () => {
  // An invented field in northern Illinois, two December days from 00:00 CST (06:00 UTC).
  const field = { latDeg: 42.0, lonDeg: -87.9 }
  const from = Date.UTC(2026, 11, 5, 6)
  const week: CrewReadingHour[] = Array.from({ length: 48 }, (_, i) => ({ startMs: from + i * HOUR_MS, state: 'clear' }))
  // Reference: suncalc's getTimes (sunrise and sunset = the sun's centre at -0.833 deg,
  // the usual refraction of 0.567 deg plus the semi-diameter of 0.266 deg; suncalc 1.9.0
  // README and its `times` table, after Astronomy Answers,
  // https://aa.quae.nl/en/reken/zonpositie.html). An hour is a night hour when its middle
  // lies before sunrise or after sunset of that day. At this place and date both lie 8 min
  // or more from any hour's middle, so the reference and the product's altitude test agree
  // without a borderline case.
  const referenceNight = (startMs: number) => {
    const mid = startMs + HOUR_MS / 2
    const { sunrise, sunset } = SunCalc.getTimes(new Date(mid), field.latDeg, field.lonDeg)
    return mid < sunrise.getTime() || mid > sunset.getTime()
  }

  it('flags each hour by the sun at the field', () => {
    const flagged = nightFlagged(week, field)
    expect(flagged.map((h) => h.night)).toEqual(week.map((h) => referenceNight(h.startMs)))
    // Sat 5 Dec: sunrise 13:05 UTC, sunset 22:21 UTC; the day hours are 13:00-22:00 UTC
    // (07:00-16:00 CST), nine of them.
    const day = flagged.slice(0, 24).filter((h) => !h.night)
    expect(day.length).toBe(9)
    expect(day[0].startMs).toBe(Date.UTC(2026, 11, 5, 13))
    expect(day.at(-1)!.startMs).toBe(Date.UTC(2026, 11, 5, 21))
  })

  it('keeps a flag that is already there (the server computed it)', () => {
    const kept = nightFlagged([{ startMs: Date.UTC(2026, 11, 5, 18), state: 'clear', night: true }], field)
    expect(kept[0].night).toBe(true)
  })

  it('closes a Clear day at the end of the last daylight hour and opens after sunrise', () => {
    const flagged = nightFlagged(week, field)
    // 09:10 CST Saturday: open until 16:00 CST, the end of the hour whose middle (15:30)
    // precedes sunset (16:21 CST).
    expect(openSpan(flagged, Date.UTC(2026, 11, 5, 15, 10), strict)).toMatchObject({
      openNow: true,
      closesAtMs: Date.UTC(2026, 11, 5, 22),
      closesWithDaylight: true,
    })
    // 20:00 CST: dark; it opens at 07:00 CST Sunday (sunrise 07:06 CST, the hour's middle after it).
    expect(openSpan(flagged, Date.UTC(2026, 11, 6, 2), strict)).toMatchObject({
      nightNow: true,
      opensAtMs: Date.UTC(2026, 11, 6, 13),
      opensWithDaylight: true,
    })
  })
})
