/**
 * Geometry and symbols of the polar sky view: pure functions, unit-tested.
 *
 * Projection: the zenith at the centre, the horizon on the outer circle, radius linear
 * in zenith angle (r = R * (90 - elevation) / 90); azimuth clockwise from north (up),
 * so east is to the right as on a compass card seen from above the antenna.
 */
import type { GnssSystem } from '@shared/schemas/orbits'

export interface XY {
  x: number
  y: number
}

/** SVG coordinates of a direction, relative to the plot centre, for a plot of radius `r`. */
export function polarToXY(azimuthDeg: number, elevationDeg: number, r: number): XY {
  const el = Math.max(0, Math.min(90, elevationDeg))
  const rho = (r * (90 - el)) / 90
  const a = (azimuthDeg * Math.PI) / 180
  return { x: rho * Math.sin(a), y: -rho * Math.cos(a) }
}

function fmt(n: number): string {
  return (Math.round(n * 100) / 100).toString()
}

/**
 * The region of sky hidden by obstructions, as an SVG path (even-odd fill): the outer
 * horizon circle minus the inner outline that follows the horizon mask. Empty when
 * nothing is blocked. `maskDeg[k]` is the blocked elevation over azimuths [k, k+1).
 */
export function horizonCutPath(maskDeg: readonly number[], r: number): string {
  if (maskDeg.length === 0 || maskDeg.every((v) => !(v > 0))) return ''
  const n = maskDeg.length
  const step = 360 / n
  const parts: string[] = []
  // Inner outline: each bin drawn as a short arc at its elevation (stepped), clockwise.
  for (let k = 0; k < n; k++) {
    const el = Math.max(0, maskDeg[k])
    const a = polarToXY(k * step, el, r)
    const b = polarToXY((k + 1) * step, el, r)
    parts.push(`${k === 0 ? 'M' : 'L'}${fmt(a.x)},${fmt(a.y)}`, `L${fmt(b.x)},${fmt(b.y)}`)
  }
  parts.push('Z')
  // Outer circle, drawn as two arcs.
  parts.push(`M0,${fmt(-r)}`, `A${fmt(r)},${fmt(r)} 0 1,1 0,${fmt(r)}`, `A${fmt(r)},${fmt(r)} 0 1,1 0,${fmt(-r)}`, 'Z')
  return parts.join(' ')
}

/** Highest blocked elevation and the azimuth bin where it is (null when nothing blocks). */
export function horizonPeak(maskDeg: readonly number[]): { elevationDeg: number; azimuthDeg: number } | null {
  let best = -1
  let at = -1
  maskDeg.forEach((v, k) => {
    if (v > best) {
      best = v
      at = k
    }
  })
  if (!(best > 0)) return null
  return { elevationDeg: best, azimuthDeg: (at * 360) / maskDeg.length + 180 / maskDeg.length }
}

/** The compass point of an azimuth: N, NE, E, ... (8 points). */
export function compassPoint(azimuthDeg: number): string {
  const names = ['N', 'NE', 'E', 'SE', 'S', 'SW', 'W', 'NW']
  const i = Math.round((((azimuthDeg % 360) + 360) % 360) / 45) % 8
  return names[i]
}

/**
 * A satellite's track as SVG polyline pieces: only the parts above the horizon, split
 * where it dips below so that no line is drawn across the plot.
 */
export function trackPieces(
  track: readonly { azimuthDeg: number; elevationDeg: number }[],
  r: number,
): string[] {
  const pieces: string[] = []
  let current: string[] = []
  for (const p of track) {
    if (p.elevationDeg < 0) {
      if (current.length > 1) pieces.push(current.join(' '))
      current = []
      continue
    }
    const xy = polarToXY(p.azimuthDeg, p.elevationDeg, r)
    current.push(`${fmt(xy.x)},${fmt(xy.y)}`)
  }
  if (current.length > 1) pieces.push(current.join(' '))
  return pieces
}

export type MarkerShape = 'circle' | 'triangle' | 'diamond' | 'square' | 'hexagon' | 'pentagon' | 'cross'

/**
 * Skyfurrow's constellation symbols: each constellation has its own shape AND colour, so
 * the plot reads without colour vision. The colours are spaced in lightness and hue so
 * that they stay apart under the common colour-vision deficiencies (no red/green pair).
 */
export const systemSymbols: Record<GnssSystem, { shape: MarkerShape; colour: string; label: string }> = {
  GPS: { shape: 'circle', colour: '#1d4f91', label: 'GPS' },
  GLONASS: { shape: 'triangle', colour: '#c0620a', label: 'GLONASS' },
  Galileo: { shape: 'diamond', colour: '#0f7f86', label: 'Galileo' },
  BeiDou: { shape: 'square', colour: '#6a3d8f', label: 'BeiDou' },
  QZSS: { shape: 'pentagon', colour: '#8c6d00', label: 'QZSS' },
  SBAS: { shape: 'hexagon', colour: '#4d4d4d', label: 'SBAS' },
  Other: { shape: 'cross', colour: '#222222', label: 'Other' },
}

/** SVG path of a marker of size `s` (about the diameter) centred on 0,0. */
export function markerPath(shape: MarkerShape, s: number): string {
  const h = s / 2
  const poly = (n: number, rot: number) =>
    Array.from({ length: n }, (_, i) => {
      const a = rot + (i * 2 * Math.PI) / n
      return `${i === 0 ? 'M' : 'L'}${fmt(h * Math.cos(a))},${fmt(h * Math.sin(a))}`
    }).join(' ') + ' Z'
  switch (shape) {
    case 'circle':
      return `M${fmt(-h)},0 A${fmt(h)},${fmt(h)} 0 1,0 ${fmt(h)},0 A${fmt(h)},${fmt(h)} 0 1,0 ${fmt(-h)},0 Z`
    case 'triangle':
      return poly(3, -Math.PI / 2)
    case 'diamond':
      return poly(4, -Math.PI / 2)
    case 'square': {
      const q = h * 0.85
      return `M${fmt(-q)},${fmt(-q)} L${fmt(q)},${fmt(-q)} L${fmt(q)},${fmt(q)} L${fmt(-q)},${fmt(q)} Z`
    }
    case 'pentagon':
      return poly(5, -Math.PI / 2)
    case 'hexagon':
      return poly(6, 0)
    case 'cross': {
      const t = h * 0.35
      return `M${fmt(-t)},${fmt(-h)} L${fmt(t)},${fmt(-h)} L${fmt(t)},${fmt(-t)} L${fmt(h)},${fmt(-t)} L${fmt(h)},${fmt(t)} L${fmt(t)},${fmt(t)} L${fmt(t)},${fmt(h)} L${fmt(-t)},${fmt(h)} L${fmt(-t)},${fmt(t)} L${fmt(-h)},${fmt(t)} L${fmt(-h)},${fmt(-t)} L${fmt(-t)},${fmt(-t)} Z`
    }
  }
}
