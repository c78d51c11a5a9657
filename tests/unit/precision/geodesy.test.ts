import { describe, expect, it } from 'vitest'
import { ecefToEnu, ecefToGeodetic, geodeticToEcef } from '@shared/precision'

// Sexagesimal to decimal degrees.
const dms = (d: number, m: number, s: number) => d + m / 60 + s / 3600

describe('WGS-84 geodetic <-> ECEF', () => {
  // IOGP Publication 373-7-2 (EPSG Guidance Note 7-2), method 9602, worked example:
  // 53 deg 48' 33.820" N, 2 deg 07' 46.380" E, h = 73.000 m
  // -> X = 3771793.968, Y = 140253.342, Z = 5124304.349 m.
  const point = { latDeg: dms(53, 48, 33.82), lonDeg: dms(2, 7, 46.38), heightM: 73 }
  const published: [number, number, number] = [3771793.968, 140253.342, 5124304.349]

  it('matches the IOGP 373-7-2 method 9602 example (forward) to 1 mm', () => {
    const xyz = geodeticToEcef(point)
    for (let i = 0; i < 3; i++) expect(Math.abs(xyz[i] - published[i])).toBeLessThan(0.001)
  })

  it('matches the IOGP 373-7-2 method 9602 example (inverse) to 1e-8 deg and 1 mm', () => {
    const g = ecefToGeodetic(published)
    // The published coordinates are rounded to 0.001" (3e-8 deg) and 1 mm.
    expect(Math.abs(g.latDeg - point.latDeg)).toBeLessThan(1e-7)
    expect(Math.abs(g.lonDeg - point.lonDeg)).toBeLessThan(1e-7)
    expect(Math.abs(g.heightM - point.heightM)).toBeLessThan(0.002)
  })

  it('round-trips points on all continents and heights (property, 1e-9 deg / 0.1 mm)', () => {
    for (let lat = -89; lat <= 89; lat += 17.8) {
      for (let lon = -179; lon <= 179; lon += 31.4) {
        for (const h of [-100, 0, 3.5, 2000, 20_200_000]) {
          const g = ecefToGeodetic(geodeticToEcef({ latDeg: lat, lonDeg: lon, heightM: h }))
          expect(Math.abs(g.latDeg - lat)).toBeLessThan(1e-9)
          expect(Math.abs(g.lonDeg - lon)).toBeLessThan(1e-9)
          expect(Math.abs(g.heightM - h)).toBeLessThan(1e-4)
        }
      }
    }
  })
})

describe('topocentric East-North-Up', () => {
  // IOGP 373-7-2, method 9836 worked example: origin 55 N, 5 E, h = 200 m
  // (ECEF 3652755.3058, 319574.6799, 5201547.3536); the point of the 9602 example ->
  // E = -189013.869, N = -128642.040, U = -4220.171 m.
  const origin = { latDeg: 55, lonDeg: 5, heightM: 200 }

  it('places the origin at the published ECEF coordinates (0.1 mm)', () => {
    const o = geodeticToEcef(origin)
    const published = [3652755.3058, 319574.6799, 5201547.3536]
    for (let i = 0; i < 3; i++) expect(Math.abs(o[i] - published[i])).toBeLessThan(1e-4)
  })

  it('matches the IOGP 373-7-2 method 9836 example to 1 mm', () => {
    const enu = ecefToEnu([3771793.968, 140253.342, 5124304.349], origin)
    const published = [-189013.869, -128642.04, -4220.171]
    for (let i = 0; i < 3; i++) expect(Math.abs(enu[i] - published[i])).toBeLessThan(0.001)
  })
})
