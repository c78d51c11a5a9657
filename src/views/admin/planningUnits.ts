// Units on the planning admin pages: errors and sigma in cm (metric) or inches (imperial),
// antenna heights in m or ft, work rates in ha/h or ac/h. Values are stored in SI units;
// these helpers convert for display and back for the form.
import type { UnitSystem } from '@shared/schemas'

const CM_PER_IN = 2.54
const M_PER_FT = 0.3048
const HA_PER_AC = 0.40468564224

/** Small lengths (errors, sigma): 'cm' or 'in'. */
export const smallUnit = (u: UnitSystem) => (u === 'imperial' ? 'in' : 'cm')
export const toSmall = (m: number, u: UnitSystem) => round((m * 100) / (u === 'imperial' ? CM_PER_IN : 1), 3)
export const fromSmall = (v: number, u: UnitSystem) => round(((u === 'imperial' ? v * CM_PER_IN : v) / 100), 6)

/** Heights: 'm' or 'ft'. */
export const heightUnit = (u: UnitSystem) => (u === 'imperial' ? 'ft' : 'm')
export const toHeight = (m: number, u: UnitSystem) => round(u === 'imperial' ? m / M_PER_FT : m, 2)
export const fromHeight = (v: number, u: UnitSystem) => round(u === 'imperial' ? v * M_PER_FT : v, 4)

/** Work rates: 'ha/h' or 'ac/h'. */
export const rateUnit = (u: UnitSystem) => (u === 'imperial' ? 'ac/h' : 'ha/h')
export const toRate = (haPerH: number, u: UnitSystem) => round(u === 'imperial' ? haPerH / HA_PER_AC : haPerH, 2)
export const fromRate = (v: number, u: UnitSystem) => round(u === 'imperial' ? v * HA_PER_AC : v, 4)

/** A small length for tables: "1.2 cm", "3 m" / "0.47 in", "9.8 ft". */
export function formatSmall(m: number | null, u: UnitSystem): string {
  if (m === null) return '—'
  if (u === 'imperial') {
    const inches = (m * 100) / CM_PER_IN
    return inches >= 36 ? `${fmt(m / M_PER_FT, 1)} ft` : `${fmt(inches, inches < 1 ? 2 : 1)} in`
  }
  return m >= 1 ? `${fmt(m, 2)} m` : `${fmt(m * 100, 1)} cm`
}

export const formatHeight = (m: number, u: UnitSystem) => `${fmt(toHeight(m, u), 1)} ${heightUnit(u)}`
export const formatRate = (haPerH: number, u: UnitSystem) => `${fmt(toRate(haPerH, u), 1)} ${rateUnit(u)}`

function fmt(v: number, digits: number): string {
  return v.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: 0 })
}

function round(v: number, digits: number): number {
  const f = 10 ** digits
  return Math.round(v * f) / f
}

/**
 * The SI value of a form field: the original value when the field still shows it (so that
 * opening and saving a form in inches does not shift 5 cm to 5.0013 cm), else the converted one.
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
