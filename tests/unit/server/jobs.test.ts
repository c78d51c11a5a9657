// Pure parts of the forecast jobs: the inputs version, chunked engine runs, retry delays,
// the dead-process check, the nightly schedule and error texts.
import { describe, expect, it } from 'vitest'
import { forecastField, nominalConstellation } from '../../../shared/precision/index.ts'
import { forecastWindow, windowSpan } from '../../../shared/schemas/forecast.ts'
import { runEngineTask } from '../../../server/jobs/engineWorker.ts'
import { msUntilLocalTime, nightlyKey } from '../../../server/jobs/index.ts'
import { engineTask, inputsVersion, outagesInWindow, type VersionInputs } from '../../../server/forecast/inputs.ts'
import { errorText, lockHolderGone, retryDelayMs } from '../../../server/jobs/runner.ts'
import { hostname } from 'node:os'

const H = 3_600_000
const start = Date.UTC(2026, 11, 7)
const boundary = JSON.stringify({
  type: 'Polygon',
  coordinates: [[[-93.62, 42.03], [-93.615, 42.03], [-93.615, 42.0327], [-93.62, 42.0327], [-93.62, 42.03]]],
})

function base(): VersionInputs {
  return {
    field: { id: 7, revision: 3, boundary, antennaHeightM: 3.5, sigmaUereM: 0.012 },
    obstructions: [
      { id: 2, kind: 'evergreen', heightM: 12, geometry: '{"type":"LineString","coordinates":[[-93.62,42.033],[-93.615,42.033]]}', leaflessFrom: null, leaflessTo: null },
      { id: 5, kind: 'deciduous', heightM: 20, geometry: '{"type":"LineString","coordinates":[[-93.621,42.03],[-93.621,42.0327]]}', leaflessFrom: '11-20', leaflessTo: '04-10' },
    ],
    orbitVersion: 'orbits-v1',
    outages: [
      { satId: 'G07', fromMs: start + 10 * H, toMs: start + 12 * H },
      { satId: 'E11', fromMs: start + 30 * H, toMs: start + 40 * H },
    ],
    workTypes: [
      { id: 1, maxH95M: 0.05, maxV95M: null, minSats: 6, maxPdop: 4, requiredShare: 0.95, requireN1: true, sigmaUereM: 0.012 },
      { id: 3, maxH95M: 3, maxV95M: null, minSats: 5, maxPdop: 6, requiredShare: 0.8, requireN1: false, sigmaUereM: 0.8 },
    ],
    windowStartMs: start,
    windowHours: 168,
    settings: { stepMin: 5, sampleCount: 64, maskDeg: 10 },
  }
}

describe('inputs version', () => {
  it('is a 64-digit hex hash that does not depend on the order rows come in', () => {
    const v = inputsVersion(base())
    expect(v).toMatch(/^[0-9a-f]{64}$/)
    const shuffled = base()
    shuffled.obstructions.reverse()
    shuffled.workTypes.reverse()
    shuffled.outages.reverse()
    expect(inputsVersion(shuffled)).toBe(v)
    expect(inputsVersion(base())).toBe(v)
  })

  it('changes with every input that changes the stored hours', () => {
    const v = inputsVersion(base())
    const changes: Array<[string, (x: VersionInputs) => void]> = [
      ['field revision', (x) => (x.field.revision = 4)],
      ['boundary', (x) => (x.field.boundary = x.field.boundary.replace('-93.615', '-93.614'))],
      ['antenna height', (x) => (x.field.antennaHeightM = 3.6)],
      ['service level sigma', (x) => (x.field.sigmaUereM = 0.02)],
      ['obstruction height', (x) => (x.obstructions[0].heightM = 13)],
      ['obstruction added', (x) => x.obstructions.push({ ...x.obstructions[0], id: 9 })],
      ['obstruction removed', (x) => x.obstructions.pop()],
      ['leafless season', (x) => (x.obstructions[1].leaflessFrom = '11-01')],
      ['orbit data', (x) => (x.orbitVersion = 'orbits-v2')],
      ['outage in the window', (x) => x.outages.push({ satId: 'C20', fromMs: start + 100 * H, toMs: start + 101 * H })],
      ['work type threshold', (x) => (x.workTypes[0].maxPdop = 3.5)],
      ['work type sigma', (x) => (x.workTypes[1].sigmaUereM = 0.6)],
      ['window', (x) => (x.windowStartMs += 24 * H)],
      ['engine step', (x) => (x.settings.stepMin = 10)],
      ['sample count', (x) => (x.settings.sampleCount = 32)],
    ]
    const seen = new Set([v])
    for (const [name, change] of changes) {
      const x = base()
      change(x)
      const changed = inputsVersion(x)
      expect(changed, name).not.toBe(v)
      seen.add(changed)
    }
    expect(seen.size).toBe(changes.length + 1)
  })

  it('ignores outages outside the window', () => {
    const x = base()
    x.outages.push({ satId: 'R03', fromMs: start - 48 * H, toMs: start - 24 * H })
    x.outages.push({ satId: 'R04', fromMs: start + 168 * H, toMs: start + 200 * H })
    expect(inputsVersion(x)).toBe(inputsVersion(base()))
    expect(outagesInWindow(x.outages, start, start + 168 * H).map((o) => o.satId)).toEqual(['G07', 'E11'])
  })
})

// Zone rules of the checks below: United States daylight saving time begins on the second
// Sunday of March and ends on the first Sunday of November at 02:00 local time (15 U.S.C.
// 260a, as amended by the Energy Policy Act of 2005, sec. 110): 8 March and 1 November in
// 2026. The European Union's summer time begins and ends at 01:00 UTC on the last Sundays
// of March and October (Directive 2000/84/EC, Art. 2 and 3): 29 March and 25 October 2026.
// India Standard Time is UTC+05:30 all year (IANA tz database, zone Asia/Kolkata).
describe('forecast window (the farm\'s seven local days)', () => {
  const H = 3_600_000
  it('runs from 00:00 local today through the end of the seventh local day', () => {
    // 15:30 UTC on 3 Dec is 09:30 CST (UTC-6) in Chicago.
    expect(forecastWindow(Date.UTC(2026, 11, 3, 15, 30), 'America/Chicago')).toEqual({
      startMs: Date.UTC(2026, 11, 3, 6),
      endMs: Date.UTC(2026, 11, 10, 6),
      hours: 168,
    })
    // 05:59 UTC on 4 Dec is still 23:59 on 3 Dec in Chicago; 06:00 UTC is its midnight.
    expect(forecastWindow(Date.UTC(2026, 11, 4, 5, 59), 'America/Chicago').startMs).toBe(Date.UTC(2026, 11, 3, 6))
    expect(forecastWindow(Date.UTC(2026, 11, 4, 6), 'America/Chicago').startMs).toBe(Date.UTC(2026, 11, 4, 6))
    expect(forecastWindow(Date.UTC(2026, 11, 2, 15, 30), 'UTC')).toEqual({ startMs: Date.UTC(2026, 11, 2), endMs: Date.UTC(2026, 11, 9), hours: 168 })
  })

  it('has 167 hours over a spring-forward day and 169 over a fall-back day', () => {
    // Chicago, 5-11 March 2026: starts at 00:00 CST (06:00 UTC), ends at 00:00 CDT (05:00 UTC).
    expect(forecastWindow(Date.UTC(2026, 2, 5, 18), 'America/Chicago')).toEqual({
      startMs: Date.UTC(2026, 2, 5, 6),
      endMs: Date.UTC(2026, 2, 12, 5),
      hours: 167,
    })
    // Chicago, 30 Oct - 5 Nov 2026: 00:00 CDT (05:00 UTC) to 00:00 CST (06:00 UTC).
    expect(forecastWindow(Date.UTC(2026, 9, 30, 12), 'America/Chicago')).toEqual({
      startMs: Date.UTC(2026, 9, 30, 5),
      endMs: Date.UTC(2026, 10, 6, 6),
      hours: 169,
    })
    // Berlin, 27 Mar - 2 Apr 2026: 00:00 CET (23:00 UTC the day before) to 00:00 CEST (22:00 UTC).
    expect(forecastWindow(Date.UTC(2026, 2, 27, 12), 'Europe/Berlin')).toEqual({
      startMs: Date.UTC(2026, 2, 26, 23),
      endMs: Date.UTC(2026, 3, 2, 22),
      hours: 167,
    })
    expect(forecastWindow(Date.UTC(2026, 9, 24, 12), 'Europe/Berlin').hours).toBe(169)
  })

  it('starts at the first whole UTC hour of the day in a half-hour zone', () => {
    // Midnight in Kolkata is 18:30 UTC the day before; the stored hours are whole UTC hours.
    const w = forecastWindow(Date.UTC(2026, 11, 3, 12), 'Asia/Kolkata')
    expect(w).toEqual({ startMs: Date.UTC(2026, 11, 2, 19), endMs: Date.UTC(2026, 11, 9, 19), hours: 168 })
    expect((w.endMs - w.startMs) / H).toBe(w.hours)
  })

  it('refuses an unknown zone, and spans several farms from the earliest start to the latest end', () => {
    expect(() => forecastWindow(Date.now(), 'Mars/Olympus')).toThrow(/Unknown time zone: Mars\/Olympus/)
    const now = Date.UTC(2026, 11, 3, 12)
    expect(windowSpan(now, ['America/Chicago', 'Europe/Berlin', 'America/Chicago'])).toEqual({
      startMs: Date.UTC(2026, 11, 2, 23),
      endMs: Date.UTC(2026, 11, 10, 6),
    })
    expect(windowSpan(now, [])).toBeNull()
  })
})

describe('chunked engine runs', () => {
  it('give the same hours as one run over the whole span', () => {
    const x = base()
    const satellites = nominalConstellation('gps')
    const task = engineTask({
      field: x.field,
      obstructions: x.obstructions,
      satellites,
      outages: x.outages,
      workTypes: x.workTypes,
      windowStartMs: start,
      windowHours: 30,
      settings: { stepMin: 10, sampleCount: 16, maskDeg: 10 },
    })
    task.chunkHours = 12
    const progress: number[] = []
    const chunked = runEngineTask(task, (done, total) => progress.push(done / total))
    expect(progress).toEqual([1 / 3, 2 / 3, 1])
    const { chunkHours: _c, ...input } = task
    const whole = forecastField(input)
    expect(chunked.hours).toHaveLength(30)
    expect(chunked.hours).toEqual(whole.hours)
    // The outage of G07 from hour 10 to 12 is in the task.
    expect(task.outages?.map((o) => o.satId)).toEqual(['G07'])
  })
})

describe('retries and dead processes', () => {
  it('backs off exponentially up to the cap', () => {
    expect([1, 2, 3, 4, 5].map((a) => retryDelayMs(a, 5_000, 30_000))).toEqual([5_000, 10_000, 20_000, 30_000, 30_000])
  })

  it('takes a lock of a pid that no longer runs on this host as gone, other hosts by heartbeat only', () => {
    const alive = (pid: number) => pid === 4242
    expect(lockHolderGone(`${hostname()}:999999:abcd`, alive)).toBe(true)
    expect(lockHolderGone(`${hostname()}:4242:abcd`, alive)).toBe(false)
    expect(lockHolderGone('another-host.example:999999:abcd', alive)).toBe(false)
    expect(lockHolderGone(null, alive)).toBe(true)
    // This very process, but a runner id that is not alive here: a previous process with the same pid.
    expect(lockHolderGone(`${hostname()}:${process.pid}:dead0000`, alive)).toBe(true)
  })

  it('reports the innermost cause of a wrapped database error', () => {
    const cause = Object.assign(new Error('Deadlock found when trying to get lock'), { code: 'ER_LOCK_DEADLOCK' })
    const wrapped = new Error('Failed query: insert into `forecast_hours` ... params: 1,2,3', { cause })
    expect(errorText(wrapped)).toBe('Deadlock found when trying to get lock (ER_LOCK_DEADLOCK)')
    expect(errorText('plain')).toBe('plain')
  })
})

describe('nightly schedule', () => {
  it('waits until the next local HH:MM', () => {
    const at = new Date(2026, 11, 2, 1, 30, 0, 0)
    expect(msUntilLocalTime('02:00', at)).toBe(30 * 60_000)
    const after = new Date(2026, 11, 2, 2, 0, 0, 0)
    expect(msUntilLocalTime('02:00', after)).toBe(24 * H)
    expect(nightlyKey(new Date(2026, 11, 2, 2, 0, 1))).toBe('nightly:2026-12-02')
  })
})
