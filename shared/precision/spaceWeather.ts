/**
 * Space weather: the planetary K index (Kp) in 3-hour blocks and the NOAA G-scale of
 * geomagnetic storms (NOAA Space Weather Prediction Center, "NOAA Space Weather Scales",
 * geomagnetic storms table, Kp column): G1 Kp = 5, G2 Kp = 6, G3 Kp = 7, G4 Kp = 8
 * (including a 9-), G5 Kp = 9. Kp is given in thirds (5- = 4.67, 5o = 5, 5+ = 5.33;
 * the thirds notation from memory of the GFZ Potsdam Kp definition): a value is read
 * as its nearest whole K class, and 9- (8.67) stays in G4 as the scale says.
 *
 * DESIGN.md: G3 and worse put RTK work at risk; each work type says whether such an
 * hour is Tight or Closed for it (or not affected).
 */

/** One 3-hour block of the Kp forecast (or observation). */
export interface KpBlock {
  startMs: number
  endMs: number
  kp: number
}

/** What a storm does to a work type's hour. */
export type StormAction = 'none' | 'tight' | 'closed'

/** The G level at which RTK work is at risk (DESIGN.md). */
export const STORM_G = 3

/**
 * The NOAA G-scale level (0 = below storm level) of a Kp value.
 *
 * @example
 * gScaleOfKp(4.67) // -> 1 (5-)
 * gScaleOfKp(8.67) // -> 4 (9- counts as G4)
 * gScaleOfKp(9)    // -> 5
 */
export function gScaleOfKp(kp: number): number {
  if (!Number.isFinite(kp) || kp < 0 || kp > 9) throw new Error(`Kp must be a number from 0 to 9 (got ${kp})`)
  let k = Math.round(kp)
  if (k === 9 && kp < 9 - 1e-9) k = 8 // 9- is G4
  return Math.max(0, k - 4)
}

/** The space weather of one clock hour: highest Kp of the blocks it touches, or null when no block covers it. */
export function hourSpaceWeather(blocks: readonly KpBlock[], hourStartMs: number, hourMs = 3_600_000): { kpMax: number; g: number } | null {
  let kpMax = -1
  for (const b of blocks) if (b.startMs < hourStartMs + hourMs && b.endMs > hourStartMs && b.kp > kpMax) kpMax = b.kp
  return kpMax < 0 ? null : { kpMax, g: gScaleOfKp(kpMax) }
}

/** A work type's state in a storm hour: 'tight' caps Clear at Tight, 'closed' closes it. */
export function stormState<S extends 'clear' | 'tight' | 'closed'>(state: S, action: StormAction): 'clear' | 'tight' | 'closed' {
  if (action === 'closed') return 'closed'
  if (action === 'tight' && state === 'clear') return 'tight'
  return state
}
