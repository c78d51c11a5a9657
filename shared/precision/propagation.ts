/**
 * Propagation: ECEF positions of every satellite at every epoch, computed once and
 * shared by all sample points.
 *
 * - SGP4/SDP4 element sets through satellite.js (TEME output, rotated to earth-fixed
 *   by GMST: r_PEF = R3(GMST) r_TEME, Vallado, Fundamentals of Astrodynamics, Example
 *   3-15; polar motion is ignored). Either the JavaScript `sgp4` loop or satellite.js's
 *   bulk WASM propagator (when the caller hands in its runtime; creating it is async).
 * - Keplerian orbits (almanac, nominal): IS-GPS-200 Table 20-IV, see orbits/kepler.ts.
 *
 * Layout of the result: Float64Array, index ((epoch * nSat) + sat) * 3 + axis, metres.
 * A satellite SGP4 cannot place at an epoch gets NaN.
 */
import { BulkPropagator, EcfPositionCalculator, EciBaseCalculator, GmstCalculator, json2satrec, sgp4, twoline2satrec, type SatRec, type createSingleThreadRuntime } from 'satellite.js'
import { keplerCircularSeriesInto, keplerPositionInto, resolveKeplerOrbit } from './orbits/kepler'
import type { KeplerOrbit, Satellite, Sgp4Orbit } from './orbits/types'
import { gmstRad } from './time'

/** The runtime of satellite.js's bulk WASM propagator (from `createSingleThreadRuntime()`). */
export type BulkRuntime = Awaited<ReturnType<typeof createSingleThreadRuntime>>

/** How SGP4 satellites are propagated. */
export interface PropagationOptions {
  /** When given, SGP4 satellites go through satellite.js's BulkPropagator on this runtime. */
  bulkRuntime?: BulkRuntime
  /**
   * When given, positions already computed for the same satellites and epochs are reused
   * (the engine worker keeps one across the fields of a run: every field of a window needs
   * the same epoch grid). The positions are read, never written, by the engine.
   */
  cache?: PositionCache
}

/** Earth-fixed positions by satellites and epochs (see PropagationOptions.cache). */
export interface PositionCache {
  get(sats: readonly Satellite[], epochsMs: ArrayLike<number>): Float64Array | undefined
  set(sats: readonly Satellite[], epochsMs: ArrayLike<number>, positions: Float64Array): void
}

/** Initialises SGP4 from a satellite's stored elements. */
export function satrecOf(orbit: Sgp4Orbit): SatRec {
  if (orbit.tle) return twoline2satrec(orbit.tle[0], orbit.tle[1])
  if (orbit.omm) return json2satrec(orbit.omm)
  throw new Error('SGP4 orbit without elements')
}

/**
 * TEME -> earth-fixed (pseudo-body-fixed) rotation by GMST: r_PEF = R3(GMST) r_TEME.
 * Units are kept. Polar motion is ignored.
 *
 * @example
 * temeToEcef([5094.18016210, 6127.64465950, 6380.34453270], Date.UTC(2004, 3, 6, 7, 51, 28, 386))
 * // -> about [-1033.48, 7901.30, 6380.34]
 */
export function temeToEcef(r: [number, number, number], utcMs: number): [number, number, number] {
  const g = gmstRad(utcMs)
  const cg = Math.cos(g)
  const sg = Math.sin(g)
  return [cg * r[0] + sg * r[1], -sg * r[0] + cg * r[1], r[2]]
}

/**
 * ECEF positions (m) of all satellites at all epochs.
 *
 * @example
 * const epochs = [Date.UTC(2026, 11, 2), Date.UTC(2026, 11, 2, 0, 5)]
 * const pos = satellitePositions(nominalConstellation('gps'), epochs)
 * // pos[(1 * 24 + 3) * 3 + 2] = z (m) of the fourth satellite at the second epoch
 */
export function satellitePositions(
  sats: readonly Satellite[],
  epochsMs: ArrayLike<number>,
  options: PropagationOptions = {},
): Float64Array {
  if (options.cache) {
    const hit = options.cache.get(sats, epochsMs)
    if (hit) return hit
    const computed = satellitePositions(sats, epochsMs, { ...options, cache: undefined })
    options.cache.set(sats, epochsMs, computed)
    return computed
  }
  const nSat = sats.length
  const nEp = epochsMs.length
  const out = new Float64Array(nSat * nEp * 3)
  if (nEp === 0 || nSat === 0) return out
  const keplerIdx: number[] = []
  const keplerOrbits: KeplerOrbit[] = []
  const sgpIdx: number[] = []
  const satrecs: SatRec[] = []
  sats.forEach((s, i) => {
    if (s.orbit.kind === 'kepler') {
      keplerIdx.push(i)
      keplerOrbits.push(resolveKeplerOrbit(s.orbit, epochsMs[0]))
    } else {
      sgpIdx.push(i)
      satrecs.push(satrecOf(s.orbit))
    }
  })
  // Evenly spaced epochs let circular orbits use angle-addition steps (no sin/cos per epoch).
  const step = nEp > 1 ? epochsMs[1] - epochsMs[0] : 0
  let even = nEp > 2
  for (let e = 2; e < nEp && even; e++) even = epochsMs[e] - epochsMs[e - 1] === step
  for (let k = 0; k < keplerIdx.length; k++) {
    const o = keplerOrbits[k]
    if (even && o.e === 0) {
      keplerCircularSeriesInto(o, epochsMs[0], step, nEp, out, keplerIdx[k] * 3, nSat * 3)
    } else {
      for (let e = 0; e < nEp; e++) keplerPositionInto(o, epochsMs[e], out, (e * nSat + keplerIdx[k]) * 3)
    }
  }
  if (satrecs.length > 0) {
    if (options.bulkRuntime) sgp4Bulk(satrecs, sgpIdx, epochsMs, nSat, out, options.bulkRuntime)
    else sgp4Loop(satrecs, sgpIdx, epochsMs, nSat, out)
  }
  return out
}

function sgp4Loop(satrecs: SatRec[], idx: number[], epochsMs: ArrayLike<number>, nSat: number, out: Float64Array): void {
  const nEp = epochsMs.length
  for (let e = 0; e < nEp; e++) {
    const t = epochsMs[e]
    const g = gmstRad(t)
    const cg = Math.cos(g)
    const sg = Math.sin(g)
    const jd = t / 86_400_000 + 2440587.5
    const base = e * nSat * 3
    for (let k = 0; k < satrecs.length; k++) {
      const rec = satrecs[k]
      const o = base + idx[k] * 3
      const pv = sgp4(rec, (jd - rec.jdsatepoch) * 1440)
      if (!pv || rec.error !== 0) {
        out[o] = out[o + 1] = out[o + 2] = NaN
        continue
      }
      const p = pv.position
      out[o] = (cg * p.x + sg * p.y) * 1000
      out[o + 1] = (-sg * p.x + cg * p.y) * 1000
      out[o + 2] = p.z * 1000
    }
  }
}

function sgp4Bulk(
  satrecs: SatRec[],
  idx: number[],
  epochsMs: ArrayLike<number>,
  nSat: number,
  out: Float64Array,
  runtime: BulkRuntime,
): void {
  const nEp = epochsMs.length
  const dates: Date[] = new Array(nEp)
  for (let e = 0; e < nEp; e++) dates[e] = new Date(epochsMs[e])
  const bulk = new BulkPropagator({
    runtime,
    calculators: [new EciBaseCalculator(), new GmstCalculator(), new EcfPositionCalculator()],
    satRecsCount: satrecs.length,
    datesCount: nEp,
  })
  try {
    bulk.setSatRecs(satrecs)
    bulk.setDates(dates)
    bulk.run()
    const raw = bulk.getRawOutput()
    const pos = raw.ecfPosition
    const err = raw.eci.error
    for (let k = 0; k < satrecs.length; k++) {
      for (let e = 0; e < nEp; e++) {
        const src = (k * nEp + e) * 3
        const o = (e * nSat + idx[k]) * 3
        if (err[k * nEp + e] !== 0) {
          out[o] = out[o + 1] = out[o + 2] = NaN
          continue
        }
        out[o] = pos[src] * 1000
        out[o + 1] = pos[src + 1] * 1000
        out[o + 2] = pos[src + 2] * 1000
      }
    }
  } finally {
    bulk.dispose()
  }
}
