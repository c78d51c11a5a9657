/**
 * The terrain stage of `npm run bench`: the terrain horizon of the scenario's 64 sample
 * points over a 2000 x 2000 grid (5 m nodes, 10 km square around the field, a valley
 * made from a formula), reach 5 km, k = 0.13; then the week forecast with those horizons
 * (as the job worker passes them: computed once, reused by every chunk of hours) beside
 * the same forecast without terrain. A measurement, never a test.
 */
import {
  DEMO_WORK_TYPES,
  fieldTerrainHorizons,
  forecastField,
  type FieldForecastInput,
  type Satellite,
  type TerrainGrid,
  TERRAIN_MAX_DISTANCE_M,
  TERRAIN_REFRACTION_K,
} from '../../shared/precision/index'
import { ANTENNA_M, FIELD, HOURS, MASK_DEG, OBSTRUCTIONS, SAMPLE_COUNT, SIGMA_UERE_M, START_MS, STEP_MIN } from './scenario'

const N = 2000
const CELL_M = 5

/** A valley running north-south through the field, its walls 250 m high, with some ripples. */
export function benchValleyGrid(): TerrainGrid {
  const ring = FIELD.coordinates[0]
  const lon0 = ring.reduce((a, p) => a + p[0], 0) / ring.length
  const lat0 = ring.reduce((a, p) => a + p[1], 0) / ring.length
  const half = ((N - 1) * CELL_M) / 2
  const heightsM = new Float32Array(N * N)
  for (let j = 0; j < N; j++) {
    const y = half - j * CELL_M
    for (let i = 0; i < N; i++) {
      const x = -half + i * CELL_M
      const across = x / 900
      heightsM[j * N + i] = 120 + 250 * (1 - Math.exp(-across * across)) + 15 * Math.sin(y / 310) * Math.cos(x / 270)
    }
  }
  return { originLatDeg: lat0, originLonDeg: lon0, x0M: -half, y0M: half, cellM: CELL_M, cols: N, rows: N, heightsM }
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2
}

/** Runs the terrain stage; returns table rows. */
export function terrainStage(satellites: Satellite[], runs: number): Array<[string, string]> {
  const grid = benchValleyGrid()
  const input: FieldForecastInput = {
    field: FIELD, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites, startMs: START_MS, hours: HOURS,
    stepMin: STEP_MIN, maskDeg: MASK_DEG, sigmaUereM: SIGMA_UERE_M, workTypes: DEMO_WORK_TYPES, sampleCount: SAMPLE_COUNT,
    terrain: { grid, options: { maxDistanceM: TERRAIN_MAX_DISTANCE_M, refractionK: TERRAIN_REFRACTION_K } },
  }
  fieldTerrainHorizons(input) // warm-up
  const tHorizon: number[] = []
  const cHorizon: number[] = []
  let horizons: Float64Array | null = null
  for (let r = 0; r < runs; r++) {
    const c0 = process.cpuUsage()
    const t0 = performance.now()
    horizons = fieldTerrainHorizons(input)
    tHorizon.push(performance.now() - t0)
    const c = process.cpuUsage(c0)
    cHorizon.push((c.user + c.system) / 1000)
  }
  let maxDeg = 0
  for (const v of horizons!) if (v > maxDeg) maxDeg = v
  const week = (withTerrain: boolean) => {
    const t: number[] = []
    const cpu: number[] = []
    const masks: number[] = []
    for (let r = 0; r < runs; r++) {
      const c0 = process.cpuUsage()
      const t0 = performance.now()
      const res = forecastField(
        withTerrain ? { ...input, terrain: { grid: null, pointHorizonsDeg: horizons! } } : { ...input, terrain: null },
        () => performance.now(),
      )
      t.push(performance.now() - t0)
      const c = process.cpuUsage(c0)
      cpu.push((c.user + c.system) / 1000)
      masks.push(res.stageTimes!.masksMs)
    }
    return { wall: median(t), cpu: median(cpu), masks: median(masks) }
  }
  week(true)
  const plain = week(false)
  const terrain = week(true)
  return [
    ['grid', `${N} x ${N} nodes at ${CELL_M} m, reach 5 km, k = 0.13`],
    ['terrain horizon, 64 points x 360 bins, median wall', `${median(tHorizon).toFixed(1)} ms`],
    ['terrain horizon, median CPU (target <= 1000 ms)', `${median(cHorizon).toFixed(1)} ms`],
    ['highest terrain angle over the points', `${maxDeg.toFixed(2)} deg`],
    ['week forecast without terrain, masks / total wall / total CPU', `${plain.masks.toFixed(1)} ms / ${plain.wall.toFixed(0)} ms / ${plain.cpu.toFixed(0)} ms`],
    ['week forecast with the horizons, masks / total wall / total CPU', `${terrain.masks.toFixed(1)} ms / ${terrain.wall.toFixed(0)} ms / ${terrain.cpu.toFixed(0)} ms`],
  ]
}
