/**
 * The yardstick: a straightforward pipeline to compare the engine with, on the same
 * inputs. satellite.js `propagate` once per satellite and epoch (TEME -> ECF with
 * `gstime`/`eciToEcf`), `ecfToLookAngles` for every sample point, and a general matrix
 * inverse (mathjs) of G^T G for the DOP. It does less than the engine: no N-1 margin,
 * no hourly aggregation, no work types.
 */
import { inv } from 'mathjs'
import { ecfToLookAngles, eciToEcf, gstime, json2satrec, propagate } from 'satellite.js'
import type { Satellite } from '../../shared/precision/index'

export interface YardstickResult {
  hdop: Float64Array
  satellites: Uint16Array
  times: { propagationMs: number; lookAnglesMs: number; dopMs: number }
  evaluations: number
}

export function yardstick(
  sats: Satellite[],
  epochs: Float64Array,
  points: Array<{ latDeg: number; lonDeg: number }>,
  heightKm: number,
  masks: number[][],
  maskDeg: number,
): YardstickResult {
  const satrecs = sats.map((s) => json2satrec((s.orbit as { omm: Parameters<typeof json2satrec>[0] }).omm))
  const systems = sats.map((s) => s.system)
  const nP = points.length
  const hdop = new Float64Array(epochs.length * nP)
  const count = new Uint16Array(epochs.length * nP)
  const observers = points.map((p) => ({ latitude: (p.latDeg * Math.PI) / 180, longitude: (p.lonDeg * Math.PI) / 180, height: heightKm }))
  let tProp = 0
  let tLook = 0
  let tDop = 0
  for (let e = 0; e < epochs.length; e++) {
    let t0 = performance.now()
    const date = new Date(epochs[e])
    const gmst = gstime(date)
    const ecf = satrecs.map((rec) => {
      const pv = propagate(rec, date)
      return pv ? eciToEcf(pv.position, gmst) : null
    })
    let t1 = performance.now()
    tProp += t1 - t0
    for (let p = 0; p < nP; p++) {
      t0 = performance.now()
      const rows: Array<{ az: number; el: number; sys: string }> = []
      for (let s = 0; s < ecf.length; s++) {
        const pos = ecf[s]
        if (!pos) continue
        const la = ecfToLookAngles(observers[p], pos)
        const el = (la.elevation * 180) / Math.PI
        let az = (la.azimuth * 180) / Math.PI
        if (az < 0) az += 360
        if (el < maskDeg || el < masks[p][Math.floor(az) % 360]) continue
        rows.push({ az: la.azimuth, el: la.elevation, sys: systems[s] })
      }
      t1 = performance.now()
      tLook += t1 - t0
      const sysList = [...new Set(rows.map((r) => r.sys))]
      const k = 3 + sysList.length
      count[e * nP + p] = rows.length
      if (rows.length < k) {
        hdop[e * nP + p] = NaN
      } else {
        const G = rows.map((r) => {
          const g = new Array<number>(k).fill(0)
          g[0] = -Math.cos(r.el) * Math.sin(r.az)
          g[1] = -Math.cos(r.el) * Math.cos(r.az)
          g[2] = -Math.sin(r.el)
          g[3 + sysList.indexOf(r.sys)] = 1
          return g
        })
        const N: number[][] = []
        for (let i = 0; i < k; i++) {
          N.push(new Array<number>(k).fill(0))
          for (let j = 0; j < k; j++) for (const g of G) N[i][j] += g[i] * g[j]
        }
        const Q = inv(N) as number[][]
        hdop[e * nP + p] = Math.sqrt(Q[0][0] + Q[1][1])
      }
      tDop += performance.now() - t1
    }
  }
  return { hdop, satellites: count, times: { propagationMs: tProp, lookAnglesMs: tLook, dopMs: tDop }, evaluations: epochs.length * nP * sats.length }
}
