/**
 * Metric and imperial display of areas, lengths, rates and expected errors, and the
 * other figures shown beside them (shares, DOP, durations). Values are stored and
 * computed in SI (ha, m); only what is shown changes with the user's choice (useUnits).
 * Conversion factors are the exact international definitions (1 in = 25.4 mm,
 * 1 ft = 0.3048 m, 1 ac = 0.40468564224 ha).
 */
import type { UnitSystem } from '@shared/schemas'

export const M_PER_IN = 0.0254
export const M_PER_FT = 0.3048
export const HA_PER_AC = 0.40468564224

/** A number rounded to `digits` decimals, as text without trailing zeros beyond them. @example roundTo(2.50, 2) // -> '2.5' */
export function roundTo(value: number, digits: number): string {
  return value.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: 0 })
}

/** An area: "12.3 ha" or "30.4 ac". @example formatArea(10, 'imperial') // -> '24.7 ac' */
export function formatArea(ha: number | null | undefined, units: UnitSystem): string {
  if (ha === null || ha === undefined || !Number.isFinite(ha)) return '—'
  if (units === 'imperial') return `${roundTo(ha / HA_PER_AC, 1)} ac`
  return `${roundTo(ha, 1)} ha`
}

/**
 * An area with both units, the user's first (two decimals below 10).
 * @example formatAreaBoth(0.5, 'metric') // -> '0.5 ha (1.24 ac)'
 */
export function formatAreaBoth(areaHa: number, units: UnitSystem): string {
  const ha = `${roundTo(areaHa, areaHa < 10 ? 2 : 1)} ha`
  const acres = areaHa / HA_PER_AC
  const ac = `${roundTo(acres, acres < 10 ? 2 : 1)} ac`
  return units === 'imperial' ? `${ac} (${ha})` : `${ha} (${ac})`
}

/** A work rate: "6 ha/h" or "14.8 ac/h". */
export function formatRate(haPerH: number, units: UnitSystem): string {
  if (units === 'imperial') return `${roundTo(haPerH / HA_PER_AC, 1)} ac/h`
  return `${roundTo(haPerH, 1)} ha/h`
}

/** An obstruction or antenna height: one decimal below 10. @example formatHeight(3.048, 'imperial') // -> '10 ft' */
export function formatHeight(heightM: number, units: UnitSystem): string {
  if (units === 'imperial') {
    const ft = heightM / M_PER_FT
    return `${roundTo(ft, ft < 10 ? 1 : 0)} ft`
  }
  return `${roundTo(heightM, heightM < 10 ? 1 : 0)} m`
}

/** The unit an expected error is shown in: cm or in, or m or ft from 1 m / 3 ft up. */
export interface ErrorUnit {
  label: 'cm' | 'm' | 'in' | 'ft'
  /** metres per display unit */
  perUnitM: number
  digits: number
}

/**
 * The unit for showing errors up to `largestM`: centimetres (inches) for RTK-sized
 * errors, metres (feet) once the numbers would pass 100 cm (36 in).
 * @example errorUnit(0.05, 'metric').label // -> 'cm'
 */
export function errorUnit(largestM: number, units: UnitSystem): ErrorUnit {
  if (units === 'imperial') {
    return largestM >= 36 * M_PER_IN ? { label: 'ft', perUnitM: M_PER_FT, digits: 1 } : { label: 'in', perUnitM: M_PER_IN, digits: 1 }
  }
  return largestM >= 1 ? { label: 'm', perUnitM: 1, digits: 2 } : { label: 'cm', perUnitM: 0.01, digits: 1 }
}

/** An expected error in the unit that fits its size. @example formatErrorM(0.034, 'metric') // -> '3.4 cm' */
export function formatErrorM(m: number | null | undefined, units: UnitSystem, unit?: ErrorUnit): string {
  if (m === null || m === undefined || !Number.isFinite(m)) return '—'
  const u = unit ?? errorUnit(m, units)
  return `${roundTo(m / u.perUnitM, u.digits)} ${u.label}`
}

/** A share 0..1 as a whole percentage. @example formatShare(0.953) // -> '95 %' */
export function formatShare(share: number | null | undefined): string {
  if (share === null || share === undefined || !Number.isFinite(share)) return '—'
  return `${Math.floor(share * 100 + 1e-9)} %`
}

/** A DOP value with two decimals; "no fix" when there is none. */
export function formatDop(value: number | null | undefined): string {
  if (value === null || value === undefined) return 'no fix'
  if (!Number.isFinite(value)) return 'no fix'
  return value.toFixed(2)
}

/** A duration in minutes as "6 h 30 min". */
export function formatDuration(minutes: number): string {
  if (!Number.isFinite(minutes) || minutes <= 0) return '—'
  const h = Math.floor(minutes / 60)
  const m = Math.round(minutes % 60)
  if (h === 0) return `${m} min`
  return m === 0 ? `${h} h` : `${h} h ${m} min`
}
