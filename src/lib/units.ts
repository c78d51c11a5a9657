/**
 * Metric and imperial display of areas, lengths, heights, rates and expected errors, the
 * other figures shown beside them (shares, DOP, durations), and the conversions of form
 * values to SI and back. Values are stored and computed in SI (ha, m); only what is shown
 * changes with the user's choice (useUnits).
 *
 * Conversion factors: NIST Special Publication 811 (2008 edition), "Guide for the Use of
 * the International System of Units (SI)", Appendix B (B.8, factors listed by unit):
 * foot = 3.048 E-01 m and inch = 2.54 E-02 m (2.54 cm), both exact. The acre here is the
 * international acre, 43 560 ft^2 of the international foot: 43 560 x 0.3048^2 m^2 =
 * 4 046.856 4224 m^2 = 0.404 685 642 24 ha, exact. (SP 811's table lists the acre based on
 * the U.S. survey foot, 4.046 873 E+03 m^2, which differs from it by about 2 parts in a
 * million; that table entry is quoted from memory.)
 */
import type { UnitSystem } from '@shared/schemas'

/** metres per international foot (NIST SP 811 (2008), App. B.8: exact) */
export const M_PER_FT = 0.3048
/** centimetres per inch (NIST SP 811 (2008), App. B.8: 1 in = 2.54 cm, exact) */
export const CM_PER_IN = 2.54
/** metres per inch, 0.0254 */
export const M_PER_IN = CM_PER_IN / 100
/** hectares per international acre: 43 560 ft^2 x (0.3048 m/ft)^2 / 10 000 m^2/ha (exact) */
export const HA_PER_AC = 0.40468564224

/** A number rounded to `digits` decimals (as a number). @example roundNumber(1.23456, 2) // -> 1.23 */
function roundNumber(value: number, digits: number): number {
  const f = 10 ** digits
  return Math.round(value * f) / f
}

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

/**
 * An obstruction or antenna height: one decimal below 10 unless `digits` says how many.
 * @example formatHeight(3.048, 'imperial') // -> '10 ft'
 * @example formatHeight(3.5, 'imperial', 1) // -> '11.5 ft'
 */
export function formatHeight(heightM: number, units: UnitSystem, digits?: number): string {
  const shown = heightM / metresPerHeightUnit(units)
  return `${roundTo(shown, digits ?? (shown < 10 ? 1 : 0))} ${heightUnit(units)}`
}

/** A distance along the ground in whole metres or feet. @example formatLength(100, 'imperial') // -> '328 ft' */
export function formatLength(lengthM: number, units: UnitSystem): string {
  return units === 'imperial' ? `${Math.round(lengthM / M_PER_FT)} ft` : `${Math.round(lengthM)} m`
}

/** A small area (a woodlot, a building) in whole m² or sq ft. @example formatSmallArea(100, 'imperial') // -> '1076 sq ft' */
export function formatSmallArea(areaM2: number, units: UnitSystem): string {
  return units === 'imperial' ? `${Math.round(areaM2 / (M_PER_FT * M_PER_FT))} sq ft` : `${Math.round(areaM2)} m²`
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

// ---- form values: shown in the user's units, stored in SI ----

/** The unit of small lengths (errors, sigma): 'cm' or 'in'. */
export const smallUnit = (units: UnitSystem) => (units === 'imperial' ? 'in' : 'cm')
/** Metres as a small length in the user's unit, three decimals. @example toSmall(0.0254, 'imperial') // -> 1 */
export const toSmall = (m: number, units: UnitSystem) => roundNumber((m * 100) / (units === 'imperial' ? CM_PER_IN : 1), 3)
/** A small length typed in the user's unit, in metres (to the micrometre). @example fromSmall(1, 'imperial') // -> 0.0254 */
export const fromSmall = (v: number, units: UnitSystem) => roundNumber((units === 'imperial' ? v * CM_PER_IN : v) / 100, 6)

/**
 * A small length for the planning tables (sigma, limits): cm or m, in or ft as in
 * errorUnit, with two decimals below one inch. @example formatSmall(0.012, 'imperial') // -> '0.47 in'
 */
export function formatSmall(m: number | null, units: UnitSystem): string {
  if (m === null) return '—'
  if (units === 'imperial') {
    const inches = (m * 100) / CM_PER_IN
    return inches >= 36 ? `${roundTo(m / M_PER_FT, 1)} ft` : `${roundTo(inches, inches < 1 ? 2 : 1)} in`
  }
  return m >= 1 ? `${roundTo(m, 2)} m` : `${roundTo(m * 100, 1)} cm`
}

const metresPerHeightUnit = (units: UnitSystem) => (units === 'imperial' ? M_PER_FT : 1)
/** The unit of heights: 'm' or 'ft'. */
export const heightUnit = (units: UnitSystem) => (units === 'imperial' ? 'ft' : 'm')
/** Metres as a height in the user's unit, rounded to `digits` decimals. @example toHeight(3.048, 'imperial') // -> 10 */
export const toHeight = (m: number, units: UnitSystem, digits = 2) => roundNumber(m / metresPerHeightUnit(units), digits)
/** A height typed in the user's unit, in metres rounded to `digits` decimals. @example fromHeight(10, 'imperial') // -> 3.048 */
export const fromHeight = (v: number, units: UnitSystem, digits = 4) => roundNumber(v * metresPerHeightUnit(units), digits)
/**
 * An antenna height as its number box shows it: to 0.1 ft, or to the centimetre (the box
 * keeps what is typed to the centimetre, fromHeight(v, units, 2)). @example heightInBox(3.5, 'imperial') // -> 11.5
 */
export const heightInBox = (m: number, units: UnitSystem) => toHeight(m, units, units === 'imperial' ? 1 : 2)

/** The unit of work rates: 'ha/h' or 'ac/h'. */
export const rateUnit = (units: UnitSystem) => (units === 'imperial' ? 'ac/h' : 'ha/h')
/** Hectares per hour in the user's unit, two decimals. @example toRate(4.0468564224, 'imperial') // -> 10 */
export const toRate = (haPerH: number, units: UnitSystem) => roundNumber(units === 'imperial' ? haPerH / HA_PER_AC : haPerH, 2)
/** A work rate typed in the user's unit, in hectares per hour. @example fromRate(10, 'imperial') // -> 4.0469 */
export const fromRate = (v: number, units: UnitSystem) => roundNumber(units === 'imperial' ? v * HA_PER_AC : v, 4)

/**
 * The SI value of a form field: the original value when the field still shows it (so that
 * opening and saving a form in inches does not shift 5 cm to 5.0013 cm), else the converted one.
 * @example keepOrConvert(1.969, 0.05, (m) => toSmall(m, 'imperial'), (v) => fromSmall(v, 'imperial')) // -> 0.05
 */
export function keepOrConvert(
  shown: number | null | undefined,
  original: number | null | undefined,
  toShown: (si: number) => number,
  fromShown: (v: number) => number,
): number | undefined {
  if (shown == null) return undefined
  if (original != null && toShown(original) === shown) return original
  return fromShown(shown)
}
