// A forecast hour in its three shapes and the two conversions between them: the engine's
// hour aggregate -> the stored row (forecast jobs), the stored row -> the API's hour
// (forecast reads, hour detail). The figures themselves are defined once, in
// shared/schemas/forecast.ts; this file says how each is taken from the engine's hour.
import type { HourAggregate } from '../../shared/precision/index.ts'
import { pickHourFigures, type ForecastHour, type HourFigures, type WorkTypeHour } from '../../shared/schemas/forecast.ts'
import type { NewForecastHour } from '../db/repositories/forecasts.ts'
import type { ForecastHourRow } from '../db/schema-planning.ts'

/** How each stored figure is taken from the engine's hour aggregate (one entry per figure). */
const figureOfEngineHour: { [K in keyof HourFigures]: (h: HourAggregate) => HourFigures[K] } = {
  satsMin: (h) => h.satellites.min,
  satsMedian: (h) => h.satellites.median,
  hdopMedian: (h) => h.hdop.median,
  hdopMax: (h) => h.hdop.max,
  vdopMedian: (h) => h.vdop.median,
  vdopMax: (h) => h.vdop.max,
  pdopMax: (h) => h.pdopMax,
  n1HdopMax: (h) => h.n1HdopMax,
  h95MedianM: (h) => h.h95M.median,
  h95MaxM: (h) => h.h95M.max,
  v95MedianM: (h) => h.v95M.median,
  v95MaxM: (h) => h.v95M.max,
  noFixShare: (h) => h.noFixShare,
}
const figureEntries = Object.entries(figureOfEngineHour) as Array<[keyof HourFigures, (h: HourAggregate) => number | null]>

/** The stored figures of an engine hour. */
export function hourFiguresOf(h: HourAggregate): HourFigures {
  const out: Record<string, number | null> = {}
  for (const [name, of] of figureEntries) out[name] = of(h)
  return out as HourFigures
}

/** One engine hour as a stored row. */
export function toStoredHour(
  fieldId: number,
  h: HourAggregate,
  meta: { jobId: number; inputsVersion: string; orbitSummary: string; computedAt: Date },
): NewForecastHour {
  return {
    fieldId,
    hourStart: new Date(h.startMs),
    ...hourFiguresOf(h),
    workJson: JSON.stringify(
      Object.fromEntries(h.workTypes.map((w) => [w.id, { share: w.share, shareN1: w.shareN1, state: w.state, ...(w.reason ? { reason: w.reason } : {}) }])),
    ),
    // The hour's space weather (correction.ts) rides in the extra column: absent when no Kp data was given.
    extraJson: JSON.stringify({ samples: h.samples, ...(h.spaceWeather !== undefined ? { spaceWeather: h.spaceWeather } : {}) }),
    orbitSummary: meta.orbitSummary.slice(0, 255),
    inputsVersion: meta.inputsVersion,
    jobId: meta.jobId,
    computedAt: meta.computedAt,
  }
}

/** A stored row as the API's hour. */
export function toForecastHour(row: ForecastHourRow): ForecastHour {
  let workTypes: Record<string, WorkTypeHour> = {}
  try {
    workTypes = JSON.parse(row.workJson) as Record<string, WorkTypeHour>
  } catch {
    workTypes = {}
  }
  let spaceWeather: ForecastHour['spaceWeather']
  try {
    spaceWeather = row.extraJson ? (JSON.parse(row.extraJson) as Pick<ForecastHour, 'spaceWeather'>).spaceWeather : undefined
  } catch {
    spaceWeather = undefined
  }
  return { time: row.hourStart.toISOString(), ...pickHourFigures(row), workTypes, ...(spaceWeather !== undefined ? { spaceWeather } : {}) }
}
