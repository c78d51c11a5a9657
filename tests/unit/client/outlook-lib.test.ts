// Pure helpers of the Outlook and Passes pages: the cividis ramp against its published
// table, farm-local days across daylight-saving changes, figure scales and units, and the
// work-type limits drawn on the charts (with the baseline part, as the engine tests an hour).
import { describe, expect, it } from 'vitest'
import { linkEffect } from '@shared/precision'
import { testSample, workTests } from '@shared/precision/aggregate'
import type { SampleResults } from '@shared/precision/kernel'
import type { ServiceLevel, WorkType } from '@shared/schemas/planning'
import type { ForecastHour } from '@shared/schemas/forecast'
import { chartData, dopLimits } from '@/lib/chartSeries'
import { cividis, cividisRgb, textOnCividis } from '@/lib/cividis'
import { farmLocalToUtcIso, formatFarmSpan, localDays, mondayOf, offsetLabel, utcToFarmLocal } from '@/lib/farmTime'
import { figureLimit, figures, figureScale, formatFigure, rampPosition, scaleOfValues } from '@/lib/outlookFigures'
import { errorUnit, formatArea, formatDuration, formatErrorM, formatShare } from '@/lib/units'

describe('cividis ramp', () => {
  // Entries of the published 256-entry table (Nuñez, Anderton & Renslow, PLOS ONE 2018;
  // matplotlib `_cividis_data`) at indices that are not among the kept stops.
  const table: [number, [number, number, number]][] = [
    [8, [0.0, 0.157932, 0.357521]],
    [22, [0.0, 0.193366, 0.441561]],
    [28, [0.068968, 0.209372, 0.438863]],
    [40, [0.154261, 0.242475, 0.43012]],
    [100, [0.394568, 0.406236, 0.438986]],
    [200, [0.769353, 0.707035, 0.408516]],
    [232, [0.905589, 0.818257, 0.312889]],
    [244, [0.959284, 0.862365, 0.253563]],
    [250, [0.987293, 0.884718, 0.213336]],
  ]

  it('starts dark blue and ends yellow as the published table does', () => {
    expect(cividisRgb(0)).toEqual([0, 34, 78])
    expect(cividisRgb(1)).toEqual([254, 232, 56])
    expect(cividis(1)).toBe('#fee838')
  })

  it.each(table)('stays within 3/255 of table entry %i', (index, rgb) => {
    const got = cividisRgb(index / 255)
    rgb.forEach((v, c) => expect(Math.abs(got[c] - v * 255)).toBeLessThanOrEqual(3))
  })

  it('clamps positions outside 0..1 and treats NaN as the start', () => {
    expect(cividisRgb(-2)).toEqual(cividisRgb(0))
    expect(cividisRgb(7)).toEqual(cividisRgb(1))
    expect(cividisRgb(Number.NaN)).toEqual(cividisRgb(0))
  })

  it('writes white on the dark end and dark ink on the bright end', () => {
    expect(textOnCividis(0)).toBe('#ffffff')
    expect(textOnCividis(1)).toBe('#1f2823')
  })
})

describe('farm-local days', () => {
  it('gives the fall-back day in Chicago 25 hours with 01:00 twice', () => {
    const [day] = localDays('2026-11-01', 'America/Chicago', 1)
    expect(day.hours).toHaveLength(25)
    const ones = day.hours.filter((h) => h.slot === 1)
    expect(ones).toHaveLength(2)
    expect(ones[0].repeat).toBe(false)
    expect(ones[1].repeat).toBe(true)
    expect(ones[0].offset).toBe('UTC−5')
    expect(ones[1].offset).toBe('UTC−6')
    // Local midnight of 1 Nov 2026 in Chicago is 05:00 UTC (daylight time, UTC−5).
    expect(day.hours[0].iso).toBe('2026-11-01T05:00:00.000Z')
    expect(day.skippedSlots).toEqual([])
  })

  it('gives the spring-forward day 23 hours and leaves 02:00 out', () => {
    const [day] = localDays('2026-03-08', 'America/Denver', 1)
    expect(day.hours).toHaveLength(23)
    expect(day.skippedSlots).toEqual([2])
    expect(day.hours.map((h) => h.slot)).not.toContain(2)
  })

  it('lists seven consecutive days with ordinary days of 24 hours', () => {
    const days = localDays('2026-12-07', 'America/Chicago', 7)
    expect(days.map((d) => d.date)).toEqual(['2026-12-07', '2026-12-08', '2026-12-09', '2026-12-10', '2026-12-11', '2026-12-12', '2026-12-13'])
    expect(days.every((d) => d.hours.length === 24)).toBe(true)
    expect(days[0].label).toBe('Mon 7 Dec')
    // Each day starts where the previous one ended.
    for (let i = 1; i < days.length; i++) expect(days[i].hours[0].startMs).toBe(days[i - 1].hours[23].startMs + 3_600_000)
  })

  it('converts a farm-local start to UTC and back', () => {
    expect(farmLocalToUtcIso('2026-12-08', '06:30', 'America/Chicago')).toBe('2026-12-08T12:30:00Z')
    expect(utcToFarmLocal('2026-12-08T12:30:00Z', 'America/Chicago')).toEqual({ date: '2026-12-08', time: '06:30' })
    expect(farmLocalToUtcIso('not-a-date', '06:30', 'America/Chicago')).toBeNull()
  })

  it('writes spans in farm time, across midnight in full', () => {
    expect(formatFarmSpan('2026-12-08T12:00:00Z', '2026-12-08T20:00:00Z', 'America/Chicago')).toBe('Tue 8 Dec 06:00–14:00')
    expect(formatFarmSpan('2026-12-08T12:00:00Z', '2026-12-09T06:00:00Z', 'America/Chicago')).toBe('Tue 8 Dec 06:00–24:00')
    expect(formatFarmSpan('2026-12-09T02:00:00Z', '2026-12-09T10:00:00Z', 'America/Chicago')).toBe('Tue 8 Dec 20:00 – Wed 9 Dec 04:00')
  })

  it('names UTC offsets, half hours included', () => {
    expect(offsetLabel(-300)).toBe('UTC−5')
    expect(offsetLabel(330)).toBe('UTC+5:30')
    expect(offsetLabel(0)).toBe('UTC')
  })

  it('places half-hour zones on the stored UTC hours', () => {
    const [day] = localDays('2026-12-08', 'Asia/Kolkata', 1)
    expect(day.hours).toHaveLength(24)
    expect(day.hours[0].label).toBe('00:30')
  })

  it('finds the Monday of a week', () => {
    expect(mondayOf('2026-12-02')).toBe('2026-11-30')
    expect(mondayOf('2026-12-06')).toBe('2026-11-30')
    expect(mondayOf('2026-12-07')).toBe('2026-12-07')
  })
})

function hour(over: Partial<ForecastHour>): ForecastHour {
  return {
    time: '2026-12-08T12:00:00.000Z',
    satsMin: 14,
    satsMedian: 16,
    hdopMedian: 0.6,
    hdopMax: 0.9,
    vdopMedian: 1,
    vdopMax: 1.4,
    pdopMax: 1.6,
    n1HdopMax: 1.1,
    h95MedianM: 0.015,
    h95MaxM: 0.022,
    v95MedianM: 0.024,
    v95MaxM: 0.033,
    noFixShare: 0,
    workTypes: { '1': { share: 0.97, shareN1: 0.9, state: 'tight' } },
    ...over,
  }
}

describe('figures on the ramp', () => {
  it('puts the better end of every figure at 0 (dark blue)', () => {
    const hours = [hour({ hdopMax: 0.8, satsMin: 8 }), hour({ hdopMax: 2.4, satsMin: 20 })]
    const hdop = figureScale(figures.hdop, hours, null, 'metric')
    expect([hdop.min, hdop.max]).toEqual([0.8, 2.4])
    expect(rampPosition(hdop, 0.8)).toBe(0)
    expect(rampPosition(hdop, 2.4)).toBe(1)
    const sats = figureScale(figures.sats, hours, null, 'metric')
    expect(rampPosition(sats, 20)).toBe(0)
    expect(rampPosition(sats, 8)).toBe(1)
    expect(rampPosition(sats, null)).toBeNull()
  })

  it('reads the share of the chosen work type and always spans 0..1 for it', () => {
    const scale = figureScale(figures.share, [hour({})], 1, 'metric')
    expect([scale.min, scale.max]).toEqual([0, 1])
    expect(figures.share.value(hour({}), 1)).toBe(0.97)
    expect(figures.share.value(hour({}), 2)).toBeNull()
    expect(formatFigure(figures.share, 0.97, 'metric')).toBe('97 %')
  })

  it('spreads only differences that matter over the ramp', () => {
    // 0.1 mm apart: both land in the middle, not at the two ends.
    const scale = scaleOfValues(figures.h95, [0.01427, 0.01437], 'imperial')
    expect(scale.max - scale.min).toBeCloseTo(0.002, 9)
    expect(rampPosition(scale, 0.01427)).toBeGreaterThan(0.4)
    expect(rampPosition(scale, 0.01437)).toBeLessThan(0.6)
  })

  it('widens a flat scale and skips hours without a fix', () => {
    const scale = scaleOfValues(figures.hdop, [1.2, null, 1.2, Number.NaN], 'metric')
    expect(scale.min).toBeLessThan(1.2)
    expect(scale.max).toBeGreaterThan(1.2)
    expect(formatFigure(figures.hdop, null, 'metric')).toBe('no fix')
  })

  it('shows errors in cm or inches, metres or feet when large', () => {
    const scale = figureScale(figures.h95, [hour({ h95MaxM: 0.05 })], null, 'imperial')
    expect(scale.unit?.label).toBe('in')
    expect(formatFigure(figures.h95, 0.0254, 'imperial', scale.unit)).toBe('1 in')
    expect(errorUnit(2.5, 'metric').label).toBe('m')
    expect(errorUnit(0.4, 'metric').label).toBe('cm')
    expect(errorUnit(1.2, 'imperial').label).toBe('ft')
  })
})

describe('units', () => {
  it('writes areas, errors, shares and durations in the user’s units', () => {
    expect(formatArea(10, 'metric')).toBe('10 ha')
    expect(formatArea(10, 'imperial')).toBe('24.7 ac')
    expect(formatErrorM(0.034, 'metric')).toBe('3.4 cm')
    expect(formatErrorM(0.034, 'imperial')).toBe('1.3 in')
    expect(formatErrorM(null, 'metric')).toBe('—')
    // A share is rounded down so that 94.6 % never reads as the 95 % a work type asks for.
    expect(formatShare(0.946)).toBe('94 %')
    expect(formatDuration(330)).toBe('5 h 30 min')
    expect(formatDuration(45)).toBe('45 min')
    expect(formatDuration(1440)).toBe('24 h')
  })
})

describe('chart limits', () => {
  const rtk: ServiceLevel = { id: 3, name: 'RTK', sigmaUereM: 0.012, note: '', ppmH: 0, ppmV: 0, maxBaselineKm: null, needsBase: false }
  const engineTile = { id: '4', maxH95M: 0.05, maxV95M: 0.04, minSats: 7, maxPdop: 3, requiredShare: 0.95, requireN1: true }
  const tile: WorkType = {
    id: 4,
    name: 'Tile drainage',
    serviceLevelId: 3,
    maxH95M: 0.05,
    maxV95M: 0.04,
    minSats: 7,
    maxPdop: 3,
    requiredShare: 0.95,
    requireN1: true,
    rateHaPerH: 1.5,
    sortOrder: 4,
    active: true,
    stormAction: 'closed',
  }

  it('turns the maximum errors into DOP limits with 2DRMS and 1.96 sigma (DESIGN.md: HDOP ≈ 2.1, VDOP ≈ 1.7)', () => {
    const limits = dopLimits(tile, [rtk])
    expect(limits.hdop).toBeCloseTo(0.05 / 0.024, 6)
    expect(limits.vdop).toBeCloseTo(0.04 / (1.96 * 0.012), 6)
    expect(limits.hdop!).toBeGreaterThan(2.0)
    expect(limits.vdop!).toBeLessThan(1.75)
    expect(dopLimits(tile, [])).toEqual({ hdop: null, vdop: null, closedReason: null })
  })

  describe('with a baseline part (ppm > 0)', () => {
    // The demo RTK level: sigma 0.012 m, 1 mm per km both ways ("a few mm + 1 ppm", receiver
    // data sheets; common practice, no single source), a 30 km single-base limit.
    const rtkBase: ServiceLevel = { ...rtk, ppmH: 1, ppmV: 1, maxBaselineKm: 30, needsBase: true }
    const link = (baselineKm: number, reachable = true) => ({ kind: 'base' as const, id: 1, name: 'Yard base', baselineKm, farthestKm: baselineKm + 0.3, reachable, baselineKnown: true })

    it('shrinks the DOP limits by ppm b as the error model says: (limit / k - ppm b) / sigma', () => {
      // b = 12 km: ppm b = 12 mm. H: (0.05 / 2 - 0.012) / 0.012 = 1.08333; V: (0.04 / 1.96 - 0.012) / 0.012 = 0.70068.
      const limits = dopLimits(tile, [rtkBase], link(12))
      expect(limits.hdop).toBeCloseTo(1.083333, 5)
      expect(limits.vdop).toBeCloseTo(0.700680, 5)
      expect(limits.closedReason).toBeNull()
      // At the limit the expected error is the work type's maximum: 2 (0.012 x 1.08333 + 0.012) = 0.05 m.
      expect(2 * (0.012 * limits.hdop! + 0.012)).toBeCloseTo(0.05, 12)
      expect(chartData('dop', [hour({})], tile, [rtkBase], 'metric', link(12)).lines[0].limits).toEqual([{ name: 'HDOP limit', value: 1.08 }])
      // A baseline whose part alone uses up the limit (b = 26 km: 2 x 26 mm > 50 mm) leaves no DOP.
      expect(dopLimits(tile, [rtkBase], link(26)).hdop).toBe(0)
    })

    it('agrees with the engine’s test of a sample: just inside the limit meets the work type, just past it fails', () => {
      for (const km of [0.5, 3, 12, 18]) {
        const limits = dopLimits(tile, [rtkBase], link(km))
        // The engine's work type for this field, as the forecast job hands it over (correctionInputs.ts).
        const [test] = workTests([{ ...engineTile, ...linkEffect(rtkBase, link(km)) }], rtkBase.sigmaUereM)
        const sample = (hdop: number, vdop: number): SampleResults => ({
          nSats: Uint16Array.of(12),
          hdop: Float64Array.of(hdop),
          vdop: Float64Array.of(vdop),
          pdop: Float64Array.of(1.5),
          n1h: Float64Array.of(hdop),
          n1v: Float64Array.of(vdop),
          n1p: Float64Array.of(1.5),
        })
        const h = limits.hdop!
        const v = limits.vdop!
        expect(testSample(test, sample(h * (1 - 1e-9), v * (1 - 1e-9)), 0)).toBe(2)
        expect(testSample(test, sample(h * (1 + 1e-6), v * (1 - 1e-9)), 0)).toBe(0)
        expect(testSample(test, sample(h * (1 - 1e-9), v * (1 + 1e-6)), 0)).toBe(0)
      }
      // The geometry-only limit would have passed an hour the engine closes: HDOP 1.5 at 12 km.
      const [at12] = workTests([{ ...engineTile, ...linkEffect(rtkBase, link(12)) }], rtkBase.sigmaUereM)
      expect(1.5).toBeLessThan(dopLimits(tile, [rtk]).hdop!)
      expect(at12.maxH).toBeLessThan(1.5)
      expect(figureLimit(figures.hdop, [hour({ hdopMax: 1.5 })], tile, [rtkBase], 'metric', link(12))).toEqual({ need: 'HDOP at most 1.08', failing: 1, total: 1 })
    })

    it('draws no DOP limit when the link is not known, or when it closes the work type whatever the geometry', () => {
      // Not known (the day view of several fields): the baseline part would move the limit.
      expect(dopLimits(tile, [rtkBase])).toEqual({ hdop: null, vdop: null, closedReason: null })
      expect(chartData('dop', [hour({})], tile, [rtkBase], 'metric').lines[0].limits).toEqual([])
      // Out of the base's radio range: Closed (errorModel.ts linkEffect), so no DOP meets it.
      expect(dopLimits(tile, [rtkBase], link(5, false))).toEqual({ hdop: null, vdop: null, closedReason: 'out-of-range' })
      expect(dopLimits(tile, [rtkBase], link(31))).toEqual({ hdop: null, vdop: null, closedReason: 'baseline-limit' })
      expect(dopLimits(tile, [rtkBase], null)).toEqual({ hdop: null, vdop: null, closedReason: 'no-source' })
      // A level without a base ignores the link.
      expect(dopLimits(tile, [{ ...rtkBase, needsBase: false }]).hdop).toBeCloseTo(0.05 / 0.024, 9)
    })
  })

  it('draws the work type’s limits on the matching lines, errors in the user’s unit', () => {
    const hours = [hour({}), hour({ time: '2026-12-08T13:00:00.000Z', hdopMax: null })]
    const dop = chartData('dop', hours, tile, [rtk], 'metric')
    expect(dop.lines[0].limits).toEqual([{ name: 'HDOP limit', value: 2.08 }])
    expect(dop.lines[0].points[1]).toEqual([Date.parse('2026-12-08T13:00:00.000Z'), null])
    expect(dop.lines[3].limits).toEqual([{ name: 'PDOP limit', value: 3 }])
    const errors = chartData('errors', hours, tile, [rtk], 'metric')
    expect(errors.yName).toBe('cm')
    expect(errors.lines[0].limits).toEqual([{ name: 'Horizontal limit', value: 5 }])
    expect(errors.lines[1].limits).toEqual([{ name: 'Vertical limit', value: 4 }])
    expect(errors.lines[0].points[0][1]).toBeCloseTo(2.2, 6)
    const sats = chartData('sats', hours, tile, [rtk], 'metric')
    expect(sats.lines[0].limits).toEqual([{ name: 'Minimum', value: 7 }])
  })

  it('counts the hours shown that miss the work type on a figure, no fix included', () => {
    const hours = [hour({ hdopMax: 1.2 }), hour({ hdopMax: 2.5 }), hour({ hdopMax: null })]
    expect(figureLimit(figures.hdop, hours, tile, [rtk], 'metric')).toEqual({ need: 'HDOP at most 2.08', failing: 2, total: 3 })
    expect(figureLimit(figures.sats, [hour({ satsMin: 6 }), hour({ satsMin: 9 })], tile, [rtk], 'metric')).toEqual({
      need: 'at least 7 satellites',
      failing: 1,
      total: 2,
    })
    expect(figureLimit(figures.v95, hours, { ...tile, maxV95M: null }, [rtk], 'metric')).toBeNull()
    expect(figureLimit(figures.h95, hours, tile, [rtk], 'imperial')!.need).toBe('a horizontal error at 95 % of at most 2 in')
  })

  it('adds decimals when asked, so that close legend ticks differ', () => {
    expect(formatFigure(figures.hdop, 0.5234, 'metric', null, 1)).toBe('0.523')
    // 0.0152 m = 0.598 in
    expect(formatFigure(figures.h95, 0.0152, 'imperial', errorUnit(0.02, 'imperial'))).toBe('0.6 in')
    expect(formatFigure(figures.h95, 0.0152, 'imperial', errorUnit(0.02, 'imperial'), 2)).toBe('0.598 in')
  })
})
