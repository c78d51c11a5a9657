/**
 * Point forecast (the CLI's point mode) and the single-point sky view (for the
 * browser's Web Worker). Not hot: clarity first; DOP by dopFromDirections.
 *
 * Sources: azimuth and elevation in the local East-North-Up frame (IOGP 373-7-2, method
 * 9836, see geodesy.ts); DOP as in dop.ts (Kaplan & Hegarty; Misra & Enge sec. 6.1); the
 * N-1 margin by removing each satellite in turn and recomputing (brute force, no source
 * needed); the horizon mask of horizon.ts.
 */
import { RAD } from './constants'
import { dopFromDirections, type DopValues } from './dop'
import { enuBasis, geodeticToEcef, type GeodeticPoint } from './geodesy'
import { horizonMaskInto, readObstructions, type ObstructionShape } from './horizon'
import { round } from './aggregate'
import { checkCommon, epochList, HOUR_MS, outageFlags, selectSatellites, type SkySettings } from './forecast'
import type { Satellite } from './orbits/types'
import { satellitePositions } from './propagation'
import type { GnssSystem } from './systems'
interface PointContext {
  ecef: [number, number, number]
  basis: Float64Array
  maskBins: Float64Array | null
}

function pointContext(point: GeodeticPoint, shapes: readonly ObstructionShape[], antennaHeightM: number, atMs?: number): PointContext {
  const ecef = geodeticToEcef({ ...point, heightM: point.heightM + antennaHeightM })
  const basis = enuBasis(point.latDeg, point.lonDeg)
  let maskBins: Float64Array | null = null
  if (shapes.length > 0) maskBins = horizonMaskInto(new Float64Array(360), point, shapes, antennaHeightM, atMs)
  return { ecef, basis, maskBins }
}

function azElAt(ctx: PointContext, positions: Float64Array, o: number): { azimuthDeg: number; elevationDeg: number } {
  const dx = positions[o] - ctx.ecef[0]
  const dy = positions[o + 1] - ctx.ecef[1]
  const dz = positions[o + 2] - ctx.ecef[2]
  const b = ctx.basis
  const e = b[0] * dx + b[1] * dy + b[2] * dz
  const n = b[3] * dx + b[4] * dy + b[5] * dz
  const u = b[6] * dx + b[7] * dy + b[8] * dz
  let az = Math.atan2(e, n) * RAD
  if (az < 0) az += 360
  if (az >= 360) az -= 360
  return { azimuthDeg: az, elevationDeg: Math.atan2(u, Math.hypot(e, n)) * RAD }
}

/** Why a satellite is or is not used at a point. */
export type SatStatus = 'used' | 'below-mask' | 'behind-obstruction' | 'outage' | 'unknown-position'

function statusOf(el: number, az: number, maskDeg: number, ctx: PointContext, out: boolean): SatStatus {
  if (!Number.isFinite(el)) return 'unknown-position'
  if (out) return 'outage'
  if (el < maskDeg) return 'below-mask'
  if (ctx.maskBins) {
    const bin = Math.min(359, Math.floor(az))
    if (el < ctx.maskBins[bin]) return 'behind-obstruction'
  }
  return 'used'
}

/** One epoch of a point forecast (the CLI's point-mode record). */
export interface PointEpoch {
  time: string
  satellites: number
  ids: string[]
  gdop: number | null
  pdop: number | null
  hdop: number | null
  vdop: number | null
  tdop: number | null
}

/** Input of `forecastPoint`. */
export interface PointForecastInput extends SkySettings {
  point: { latDeg: number; lonDeg: number; heightM?: number }
  startMs: number
  hours: number
  stepMin?: number
}

/**
 * DOP at one point for every epoch (what `npm run -s forecast` prints in point mode).
 * TDOP is the clock of the first constellation in the satellite list's order.
 *
 * @example
 * forecastPoint({ point: { latDeg: 52, lonDeg: 5 }, satellites: nominalConstellation('gps'),
 *   startMs: Date.UTC(2026, 11, 2), hours: 1, stepMin: 5 })[0]
 * // -> { time: '2026-12-02T00:00:00.000Z', satellites: 8, ids: [...], gdop: 2.1, ... }
 */
export function forecastPoint(input: PointForecastInput): PointEpoch[] {
  const maskDeg = input.maskDeg ?? 10
  const stepMin = input.stepMin ?? 5
  checkCommon(maskDeg, stepMin, input.hours, input.startMs)
  const sats = selectSatellites(input)
  const epochs = epochList(input.startMs, input.hours, stepMin)
  const positions = satellitePositions(sats, epochs, input.propagation)
  const shapes = readObstructions(input.obstructions)
  const antenna = input.antennaHeightM ?? 0
  const point: GeodeticPoint = { latDeg: input.point.latDeg, lonDeg: input.point.lonDeg, heightM: input.point.heightM ?? 0 }
  const flags = outageFlags(sats, epochs, input.outages)
  const out: PointEpoch[] = []
  let ctx = pointContext(point, shapes, antenna, epochs[0])
  let ctxDay = Math.floor(epochs[0] / 86_400_000)
  for (let e = 0; e < epochs.length; e++) {
    const day = Math.floor(epochs[e] / 86_400_000)
    if (day !== ctxDay && shapes.length > 0) {
      ctx = pointContext(point, shapes, antenna, epochs[e])
      ctxDay = day
    }
    const dirs: Array<{ azimuthDeg: number; elevationDeg: number; system: string }> = []
    const ids: string[] = []
    for (let s = 0; s < sats.length; s++) {
      const ae = azElAt(ctx, positions, (e * sats.length + s) * 3)
      if (statusOf(ae.elevationDeg, ae.azimuthDeg, maskDeg, ctx, flags[e * sats.length + s] === 1) !== 'used') continue
      dirs.push({ ...ae, system: sats[s].system })
      ids.push(sats[s].id)
    }
    const dop = dopFromDirections(dirs, { weights: input.weights })
    out.push({
      time: new Date(epochs[e]).toISOString(),
      satellites: dirs.length,
      ids,
      gdop: dop ? round(dop.gdop) : null,
      pdop: dop ? round(dop.pdop) : null,
      hdop: dop ? round(dop.hdop) : null,
      vdop: dop ? round(dop.vdop) : null,
      tdop: dop ? round(dop.tdop) : null,
    })
  }
  return out
}

/** Input of `skyView`. */
export interface SkyViewInput extends SkySettings {
  point: { latDeg: number; lonDeg: number; heightM?: number }
  atMs: number
  /** half-length of the tracks (h), default 1 */
  trackHours?: number
  /** minutes between track points, default 5 */
  trackStepMin?: number
}

/** One satellite in a sky view. */
export interface SkySatellite {
  id: string
  system: GnssSystem
  name?: string
  source: Satellite['source']
  azimuthDeg: number
  elevationDeg: number
  status: SatStatus
  /** positions from atMs - trackHours to atMs + trackHours (only satellites above the horizon at some point) */
  track: Array<{ tMs: number; azimuthDeg: number; elevationDeg: number }>
}

/** A single-point sky view. */
export interface SkyView {
  atMs: number
  /** 360 entries: highest blocked elevation (deg) over azimuths [k, k+1) */
  horizonMaskDeg: number[]
  maskDeg: number
  satellites: SkySatellite[]
  /** ids of the satellites in use */
  used: string[]
  dop: DopValues | null
  /** DOP with the most damaging satellite (by HDOP) lost; null if that loses the fix */
  n1: { lostSatId: string; dop: DopValues | null } | null
}

/**
 * Sky view at one point and instant: satellites with azimuth/elevation and status,
 * their tracks +-1 h, the horizon mask cut by the obstructions, and the DOP values.
 * Cheap enough to rerun while a tree line's height is dragged (a Web Worker can call it).
 *
 * @example
 * const view = skyView({ point: { latDeg: 52, lonDeg: 5 }, atMs: Date.UTC(2026, 11, 2, 9),
 *   satellites: nominalConstellation('all'), obstructions: treeLines, antennaHeightM: 3 })
 * view.dop?.hdop // -> 0.7
 */
export function skyView(input: SkyViewInput): SkyView {
  const maskDeg = input.maskDeg ?? 10
  if (!(maskDeg >= 0 && maskDeg < 90)) throw new Error('elevation mask must be in [0, 90) degrees')
  const sats = selectSatellites(input)
  const trackHours = input.trackHours ?? 1
  const trackStep = (input.trackStepMin ?? 5) * 60_000
  const nTrack = Math.floor((2 * trackHours * HOUR_MS) / trackStep) + 1
  const epochs = new Float64Array(nTrack + 1)
  epochs[0] = input.atMs
  for (let k = 0; k < nTrack; k++) epochs[k + 1] = input.atMs - trackHours * HOUR_MS + k * trackStep
  const positions = satellitePositions(sats, epochs, input.propagation)
  const shapes = readObstructions(input.obstructions)
  const antenna = input.antennaHeightM ?? 0
  const point: GeodeticPoint = { latDeg: input.point.latDeg, lonDeg: input.point.lonDeg, heightM: input.point.heightM ?? 0 }
  const ctx = pointContext(point, shapes, antenna, input.atMs)
  const flags = outageFlags(sats, epochs, input.outages)
  const list: SkySatellite[] = []
  const dirs: Array<{ azimuthDeg: number; elevationDeg: number; system: string; id: string }> = []
  sats.forEach((s, i) => {
    const now = azElAt(ctx, positions, i * 3)
    const track: SkySatellite['track'] = []
    let above = now.elevationDeg > 0
    for (let k = 1; k <= nTrack; k++) {
      const ae = azElAt(ctx, positions, (k * sats.length + i) * 3)
      if (ae.elevationDeg > 0) above = true
      track.push({ tMs: epochs[k], azimuthDeg: round(ae.azimuthDeg, 3)!, elevationDeg: round(ae.elevationDeg, 3)! })
    }
    const status = statusOf(now.elevationDeg, now.azimuthDeg, maskDeg, ctx, flags[i] === 1)
    if (status === 'used') dirs.push({ ...now, system: s.system, id: s.id })
    if (!above) return
    list.push({
      id: s.id,
      system: s.system,
      name: s.name,
      source: s.source,
      azimuthDeg: round(now.azimuthDeg, 3)!,
      elevationDeg: round(now.elevationDeg, 3)!,
      status,
      track,
    })
  })
  const dop = dopFromDirections(dirs, { weights: input.weights })
  let n1: SkyView['n1'] = null
  if (dop) {
    let worst: { lostSatId: string; dop: DopValues | null } | null = null
    for (let j = 0; j < dirs.length; j++) {
      const d = dopFromDirections(dirs.filter((_, k) => k !== j), { weights: input.weights })
      if (!d) {
        worst = { lostSatId: dirs[j].id, dop: null }
        break
      }
      if (!worst || (worst.dop && d.hdop > worst.dop.hdop)) worst = { lostSatId: dirs[j].id, dop: d }
    }
    n1 = worst
  }
  return {
    atMs: input.atMs,
    horizonMaskDeg: ctx.maskBins ? Array.from(ctx.maskBins, (v) => round(v, 3)!) : new Array<number>(360).fill(0),
    maskDeg,
    satellites: list,
    used: dirs.map((d) => d.id),
    dop,
    n1,
  }
}
