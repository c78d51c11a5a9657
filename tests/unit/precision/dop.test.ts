import { inv, matrix } from 'mathjs'
import { describe, expect, it } from 'vitest'
import { dopFromDirections, elevationWeight } from '@shared/precision'

const DEG = Math.PI / 180

/**
 * Independent DOP for the tests: builds G explicitly (rows [-e, -n, -u, clock columns])
 * and inverts G^T W G with mathjs's general inverse (LU), not the engine's Cholesky.
 */
function referenceDop(
  sats: { azimuthDeg: number; elevationDeg: number; system?: string }[],
  weights: 'none' | 'elevation' = 'none',
) {
  const systems = [...new Set(sats.map((s) => s.system ?? 'GPS'))]
  const k = 3 + systems.length
  const G = sats.map((s) => {
    const az = s.azimuthDeg * DEG
    const el = s.elevationDeg * DEG
    const row = new Array<number>(k).fill(0)
    row[0] = -Math.cos(el) * Math.sin(az)
    row[1] = -Math.cos(el) * Math.cos(az)
    row[2] = -Math.sin(el)
    row[3 + systems.indexOf(s.system ?? 'GPS')] = 1
    return row
  })
  const w = sats.map((s) => (weights === 'elevation' ? elevationWeight(Math.sin(s.elevationDeg * DEG)) : 1))
  const N: number[][] = []
  for (let r = 0; r < k; r++) {
    N.push([])
    for (let c = 0; c < k; c++) N[r].push(G.reduce((acc, row, i) => acc + w[i] * row[r] * row[c], 0))
  }
  const Q = (inv(matrix(N)) as unknown as { toArray(): number[][] }).toArray()
  return {
    edop: Math.sqrt(Q[0][0]),
    ndop: Math.sqrt(Q[1][1]),
    vdop: Math.sqrt(Q[2][2]),
    hdop: Math.sqrt(Q[0][0] + Q[1][1]),
    pdop: Math.sqrt(Q[0][0] + Q[1][1] + Q[2][2]),
    tdop: Math.sqrt(Q[3][3]),
    gdop: Math.sqrt(Q[0][0] + Q[1][1] + Q[2][2] + Q[3][3]),
  }
}

describe('dopFromDirections against closed forms', () => {
  it('regular tetrahedron gives the classic lower bound', () => {
    // One satellite at the zenith, three at -19.47 deg, 120 deg apart: G^T G =
    // diag(4/3, 4/3, 4/3, 4) -> GDOP = sqrt(10)/2, PDOP = 1.5, HDOP = sqrt(1.5),
    // VDOP = sqrt(0.75), TDOP = 0.5 (derived; Swaszek, Hartnett & Seals, "Lower bounds
    // on DOP", J. Navigation 2017).
    const el = -Math.asin(1 / 3) / DEG // -19.47 deg
    const d = dopFromDirections([
      { azimuthDeg: 0, elevationDeg: 90 },
      { azimuthDeg: 0, elevationDeg: el },
      { azimuthDeg: 120, elevationDeg: el },
      { azimuthDeg: 240, elevationDeg: el },
    ])!
    expect(d.gdop).toBeCloseTo(Math.sqrt(10) / 2, 12)
    expect(d.pdop).toBeCloseTo(1.5, 12)
    expect(d.hdop).toBeCloseTo(Math.sqrt(1.5), 12)
    expect(d.vdop).toBeCloseTo(Math.sqrt(0.75), 12)
    expect(d.tdop).toBeCloseTo(0.5, 12)
  })

  it('zenith plus N satellites equally spaced at elevation E follows the derived forms', () => {
    // REFERENCES.md (derived): s = sin E, c = cos E; HDOP = 2 / (c sqrt N),
    // VDOP = sqrt((N+1)/N) / (1 - s), TDOP = sqrt((N s^2 + 1)/N) / (1 - s).
    for (const n of [3, 4, 5, 8]) {
      for (const eDeg of [0, 10, 25, 40]) {
        const s = Math.sin(eDeg * DEG)
        const c = Math.cos(eDeg * DEG)
        const sats = [{ azimuthDeg: 17, elevationDeg: 90 }]
        for (let k = 0; k < n; k++) sats.push({ azimuthDeg: 33 + (k * 360) / n, elevationDeg: eDeg })
        const d = dopFromDirections(sats)!
        expect(d.hdop).toBeCloseTo(2 / (c * Math.sqrt(n)), 10)
        expect(d.vdop).toBeCloseTo(Math.sqrt((n + 1) / n) / (1 - s), 10)
        expect(d.tdop).toBeCloseTo(Math.sqrt((n * s * s + 1) / n) / (1 - s), 10)
      }
    }
  })

  it('reproduces the tabulated N = 3, E = 0 case', () => {
    // REFERENCES.md: HDOP = VDOP = 1.1547, TDOP = 0.5774, GDOP = 1.7321.
    const d = dopFromDirections([
      { azimuthDeg: 0, elevationDeg: 90 },
      { azimuthDeg: 0, elevationDeg: 0 },
      { azimuthDeg: 120, elevationDeg: 0 },
      { azimuthDeg: 240, elevationDeg: 0 },
    ])!
    expect(d.hdop).toBeCloseTo(1.1547, 4)
    expect(d.vdop).toBeCloseTo(1.1547, 4)
    expect(d.tdop).toBeCloseTo(0.5774, 4)
    expect(d.gdop).toBeCloseTo(1.7321, 4)
  })
})

describe('dopFromDirections: no fix', () => {
  it('returns null with fewer satellites than unknowns (3 + one clock per system)', () => {
    // Unknowns of the model (Kaplan & Hegarty ch. on performance): 3 position + 1 clock
    // per constellation in view.
    const three = [
      { azimuthDeg: 0, elevationDeg: 30 },
      { azimuthDeg: 120, elevationDeg: 30 },
      { azimuthDeg: 240, elevationDeg: 30 },
    ]
    expect(dopFromDirections(three)).toBeNull()
    // Four satellites but two systems: five unknowns.
    expect(dopFromDirections([...three, { azimuthDeg: 60, elevationDeg: 70, system: 'Galileo' }])).toBeNull()
  })

  it('returns null for a singular geometry (all satellites on one cone around the zenith)', () => {
    // Satellites at one elevation: the up and clock columns are proportional (derived).
    const cone = [0, 72, 144, 216, 288].map((az) => ({ azimuthDeg: az, elevationDeg: 45 }))
    expect(dopFromDirections(cone)).toBeNull()
  })
})

describe('dopFromDirections against a general matrix inverse (mathjs) on random geometries', () => {
  // Deterministic pseudo-random generator (Park-Miller) so failures can be reproduced.
  let seed = 20261202
  const rand = () => ((seed = (seed * 16807) % 2147483647) - 1) / 2147483646

  it('agrees to 1e-9 (relative above DOP 1) for 300 random single- and multi-system geometries, both weightings', () => {
    const systems = ['GPS', 'Galileo', 'GLONASS', 'BeiDou']
    let compared = 0
    for (let trial = 0; trial < 300; trial++) {
      const n = 5 + Math.floor(rand() * 25)
      const nSys = 1 + Math.floor(rand() * 4)
      const sats = Array.from({ length: n }, () => ({
        azimuthDeg: rand() * 360,
        elevationDeg: 5 + rand() * 85,
        system: systems[Math.floor(rand() * nSys)],
      }))
      for (const weights of ['none', 'elevation'] as const) {
        const ours = dopFromDirections(sats, { weights })
        const uniq = new Set(sats.map((s) => s.system)).size
        if (n < 3 + uniq) {
          expect(ours).toBeNull()
          continue
        }
        const ref = referenceDop(sats, weights)
        expect(ours).not.toBeNull()
        for (const key of ['gdop', 'pdop', 'hdop', 'vdop', 'tdop', 'edop', 'ndop'] as const) {
          // 1e-9 absolute for usable geometries; ill-conditioned random draws (DOP in
          // the hundreds) lose digits in either inverse, so the bound scales with DOP.
          expect(Math.abs(ours![key] - ref[key])).toBeLessThan(1e-9 * Math.max(1, ref[key]))
        }
        compared++
      }
    }
    expect(compared).toBeGreaterThan(500)
  })

  it('takes TDOP from the first system in the input order', () => {
    const sats = [
      { azimuthDeg: 10, elevationDeg: 20, system: 'Galileo' },
      { azimuthDeg: 100, elevationDeg: 60, system: 'GPS' },
      { azimuthDeg: 200, elevationDeg: 35, system: 'Galileo' },
      { azimuthDeg: 300, elevationDeg: 15, system: 'GPS' },
      { azimuthDeg: 250, elevationDeg: 80, system: 'GPS' },
      { azimuthDeg: 45, elevationDeg: 50, system: 'Galileo' },
    ]
    const ref = referenceDop(sats) // its first clock column is Galileo's (first seen)
    expect(dopFromDirections(sats)!.tdop).toBeCloseTo(ref.tdop, 10)
    const swapped = [sats[1], ...sats.filter((_, i) => i !== 1)]
    expect(dopFromDirections(swapped)!.tdop).toBeCloseTo(referenceDop(swapped).tdop, 10)
    expect(Math.abs(dopFromDirections(swapped)!.tdop - ref.tdop)).toBeGreaterThan(1e-6)
  })
})

describe('expected errors', () => {
  it('common-practice check: standalone sigma 3 m with HDOP about 1 gives the familiar 5-10 m', async () => {
    // REFERENCES.md, facts of the trade (common practice): UERE one to a few metres,
    // typical DOPs -> 5-10 m horizontal at 95 %; 2DRMS = 2 sigma HDOP.
    const { expectedHorizontal95M } = await import('@shared/precision')
    const h = expectedHorizontal95M(1.2, 3.0)
    expect(h).toBeGreaterThanOrEqual(5)
    expect(h).toBeLessThanOrEqual(10)
  })
})
