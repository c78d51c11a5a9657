/**
 * Duration of a pass from the field's area and the work rate: area / rate, rounded up to
 * the next 15 minutes (at least 15). A machine's own rate overrides the work type's.
 */
export const DURATION_STEP_MIN = 15

/**
 * @example estimateDurationMin(120, 5, null) // -> 1440 (120 ha at 5 ha/h = 24 h)
 * @example estimateDurationMin(40, 6, 7.5)  // -> 330 (40 ha at 7.5 ha/h = 5 h 20 min -> 5 h 30 min)
 */
export function estimateDurationMin(areaHa: number, workTypeRateHaPerH: number, machineRateHaPerH?: number | null): number {
  const rate = machineRateHaPerH ?? workTypeRateHaPerH
  if (!(rate > 0)) throw new Error('The work rate must be above 0 ha/h')
  if (!(areaHa >= 0) || !Number.isFinite(areaHa)) throw new Error('The field area must be a number of hectares >= 0')
  const minutes = (areaHa / rate) * 60
  // 1e-9 keeps an exact multiple (e.g. 6 ha at 6 ha/h) from rounding up through float noise.
  const steps = Math.max(1, Math.ceil(minutes / DURATION_STEP_MIN - 1e-9))
  return steps * DURATION_STEP_MIN
}
