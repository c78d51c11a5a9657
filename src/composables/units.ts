/** Unit conversions and formats for areas, heights and errors (pure; see useUnits for the user's choice). */
import type { UnitSystem } from '@shared/schemas/common'

/** Conversion factors (exact by definition of the international foot and acre). */
export const M_PER_FT = 0.3048
export const HA_PER_AC = 0.40468564224
export const CM_PER_IN = 2.54

/** Area with both units, the user's first: "12.4 ha (30.6 ac)" or "30.6 ac (12.4 ha)". */
export function formatArea(areaHa: number, units: UnitSystem): string {
  const ha = `${roundTo(areaHa, areaHa < 10 ? 2 : 1)} ha`
  const acres = areaHa / HA_PER_AC
  const ac = `${roundTo(acres, acres < 10 ? 2 : 1)} ac`
  return units === 'imperial' ? `${ac} (${ha})` : `${ha} (${ac})`
}

/** An obstruction or antenna height: "12 m" / "39 ft" (one decimal below 10). */
export function formatHeight(heightM: number, units: UnitSystem): string {
  if (units === 'imperial') {
    const ft = heightM / M_PER_FT
    return `${roundTo(ft, ft < 10 ? 1 : 0)} ft`
  }
  return `${roundTo(heightM, heightM < 10 ? 1 : 0)} m`
}

/** A positioning error: "3.2 cm" / "1.3 in", switching to m / ft for large values. */
export function formatError(errorM: number, units: UnitSystem): string {
  if (!Number.isFinite(errorM)) return '—'
  if (units === 'imperial') {
    const inches = (errorM * 100) / CM_PER_IN
    if (inches >= 36) return `${roundTo(errorM / M_PER_FT, 1)} ft`
    return `${roundTo(inches, 1)} in`
  }
  if (errorM >= 1) return `${roundTo(errorM, 2)} m`
  return `${roundTo(errorM * 100, 1)} cm`
}

/** A number rounded to `digits` decimals, as text without trailing zeros beyond them. */
export function roundTo(value: number, digits: number): string {
  return value.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: 0 })
}
