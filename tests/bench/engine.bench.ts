/**
 * `npm run bench`: the benchmark of ENGINE.md, printed as tables.
 *
 * 1. The engine on the scenario (nominal constellations, Keplerian): stage times and
 *    evaluations per second, three warm-up runs (the first reported as the cold run)
 *    then the median of five runs.
 * 2. SGP4 propagation of the same constellations as OMM element sets: satellite.js
 *    `propagate` loop, the engine's `sgp4` loop, and the bulk WASM propagator.
 * 2b. The terrain stage (terrain.ts): 64 points over a 2000 x 2000 grid, and the week
 *    forecast with and without those horizons.
 * 3. The yardstick (yardstick.ts) and the engine on those same SGP4 inputs, and the ratio.
 * Options: --no-yardstick (skip part 3), --terrain-only (only part 2b), --runs N.
 * Benchmarks are not tests: nothing here fails on a slow machine.
 */
import { createSingleThreadRuntime, eciToEcf, gstime, json2satrec, propagate } from 'satellite.js'
import { DEMO_WORK_TYPES, forecastField, horizonMask, satellitePositions, type FieldForecast, type PropagationOptions, type Satellite } from '../../shared/precision/index'
import { ANTENNA_M, FIELD, HOURS, MASK_DEG, OBSTRUCTIONS, SAMPLE_COUNT, SIGMA_UERE_M, START_MS, STEP_MIN, nominalAsOmm, nominalSatellites } from './scenario'
import { terrainStage } from './terrain'
import { yardstick } from './yardstick'

const args = process.argv.slice(2)
const RUNS = Number(args[args.indexOf('--runs') + 1]) > 0 && args.includes('--runs') ? Number(args[args.indexOf('--runs') + 1]) : 5
const withYardstick = !args.includes('--no-yardstick')
const terrainOnly = args.includes('--terrain-only')
const WARMUPS = 3

function run(satellites: Satellite[], propagation?: PropagationOptions): { result: FieldForecast; wallMs: number; cpuMs: number } {
  const c0 = process.cpuUsage()
  const t0 = performance.now()
  const result = forecastField(
    {
      field: FIELD, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites, startMs: START_MS, hours: HOURS,
      stepMin: STEP_MIN, maskDeg: MASK_DEG, sigmaUereM: SIGMA_UERE_M, workTypes: DEMO_WORK_TYPES, sampleCount: SAMPLE_COUNT,
      propagation, includeSamples: true,
    },
    () => performance.now(),
  )
  const wallMs = performance.now() - t0
  const c = process.cpuUsage(c0)
  return { result, wallMs, cpuMs: (c.user + c.system) / 1000 }
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2
}

function table(title: string, rows: Array<[string, string]>): void {
  const w = Math.max(...rows.map((r) => r[0].length))
  const v = Math.max(...rows.map((r) => r[1].length))
  console.log(`\n${title}`)
  console.log(`| ${'stage'.padEnd(w)} | ${'value'.padStart(v)} |`)
  console.log(`| ${'-'.repeat(w)} | ${'-'.repeat(v)}:|`.replace(/ :\|$/, ':|'))
  for (const [k, val] of rows) console.log(`| ${k.padEnd(w)} | ${val.padStart(v)} |`)
}

const ms = (x: number) => `${x.toFixed(1)} ms`
const perS = (n: number, msTotal: number) => `${((n / msTotal) * 1000 / 1e6).toFixed(2)} M/s`

function engineRuns(label: string, sats: Satellite[], propagation?: PropagationOptions) {
  const warm = run(sats, propagation) // cold run (JIT not settled); reported separately
  for (let i = 0; i < WARMUPS - 1; i++) run(sats, propagation)
  const runs = Array.from({ length: RUNS }, () => run(sats, propagation))
  const pick = (f: (r: { result: FieldForecast; wallMs: number; cpuMs: number }) => number) => median(runs.map(f))
  const st = (k: keyof NonNullable<FieldForecast['stageTimes']>) => pick((r) => r.result.stageTimes![k] ?? 0)
  const wall = pick((r) => r.wallMs)
  const cpu = pick((r) => r.cpuMs)
  const r0 = runs[0].result
  const pointEpochs = r0.epochs * r0.samplePoints.length
  table(`${label} (median of ${RUNS} runs after ${WARMUPS} warm-up runs)`, [
    ['epochs x points x satellites', `${r0.epochs} x ${r0.samplePoints.length} x ${r0.satellitesUsed}`],
    ['propagation', ms(st('propagationMs'))],
    ['sample points + horizon masks', ms(st('masksMs'))],
    ['visibility + DOP + N-1', ms(st('dopMs'))],
    ['hourly aggregation', ms(st('aggregationMs'))],
    ['total (wall)', ms(wall)],
    ['total (CPU time of this process)', ms(cpu)],
    ['best run, wall / CPU', `${ms(Math.min(...runs.map((r) => r.wallMs)))} / ${ms(Math.min(...runs.map((r) => r.cpuMs)))}`],
    ['first (cold) run, wall / CPU', `${ms(warm.wallMs)} / ${ms(warm.cpuMs)}`],
    ['satellite-point evaluations/s', perS(r0.evaluations, wall)],
    ['sample-point evaluations/s', perS(pointEpochs, wall)],
  ])
  return { wall, cpu, coldWall: warm.wallMs, bestWall: Math.min(...runs.map((r) => r.wallMs)), result: r0 }
}

async function main() {
  console.log(`Skyfurrow engine benchmark: ${HOURS} h at ${STEP_MIN} min, ${SAMPLE_COUNT} sample points, nominal GPS+GLONASS+Galileo+BeiDou, ${OBSTRUCTIONS.features.length} obstructions`)
  console.log(`node ${process.version}, one thread`)
  if (terrainOnly) {
    table(`Terrain horizon (terrain.ts; median of ${RUNS} runs)`, terrainStage(nominalSatellites(), RUNS))
    return
  }
  const kepler = engineRuns('Engine, nominal constellations (embedded Keplerian model)', nominalSatellites())
  table(`Terrain horizon (terrain.ts; median of ${RUNS} runs)`, terrainStage(nominalSatellites(), RUNS))

  // SGP4 propagators on the same constellations written as OMM element sets.
  const ommSats = nominalAsOmm()
  const nEp = kepler.result.epochs
  const epochs = new Float64Array(nEp)
  for (let e = 0; e < nEp; e++) epochs[e] = START_MS + e * STEP_MIN * 60_000
  const runtime = await createSingleThreadRuntime()
  const timeIt = (f: () => void) => {
    f()
    const t: number[] = []
    for (let i = 0; i < 5; i++) {
      const t0 = performance.now()
      f()
      t.push(performance.now() - t0)
    }
    return Math.min(...t)
  }
  const satrecs = ommSats.map((s) => json2satrec((s.orbit as { omm: Parameters<typeof json2satrec>[0] }).omm))
  const tPropagate = timeIt(() => {
    for (let e = 0; e < nEp; e++) {
      const d = new Date(epochs[e])
      const g = gstime(d)
      for (const rec of satrecs) {
        const pv = propagate(rec, d)
        if (pv) eciToEcf(pv.position, g)
      }
    }
  })
  const tLoop = timeIt(() => satellitePositions(ommSats, epochs))
  const tBulk = timeIt(() => satellitePositions(ommSats, epochs, { bulkRuntime: runtime }))
  const a = satellitePositions(ommSats, epochs)
  const b = satellitePositions(ommSats, epochs, { bulkRuntime: runtime })
  let maxDiff = 0
  for (let i = 0; i < a.length; i++) maxDiff = Math.max(maxDiff, Math.abs(a[i] - b[i]))
  const faster = tBulk < tLoop ? 'bulk WASM propagator' : 'JavaScript sgp4 loop'
  table(`SGP4 propagation of ${ommSats.length} satellites x ${nEp} epochs (best of 5)`, [
    ['satellite.js propagate(date) + eciToEcf', ms(tPropagate)],
    ['engine sgp4 loop (satellitePositions)', ms(tLoop)],
    ['BulkPropagator (WASM, single thread)', ms(tBulk)],
    ['max position difference loop vs bulk', `${maxDiff.toExponential(2)} m`],
    ['faster', faster],
  ])

  const sgpProp: PropagationOptions = tBulk < tLoop ? { bulkRuntime: runtime } : {}
  const sgp = engineRuns(`Engine, same constellations as SGP4 element sets (${faster})`, ommSats, sgpProp)

  if (withYardstick) {
    const pts = sgp.result.samplePoints
    const masks = pts.map((p) => horizonMask(p, OBSTRUCTIONS, ANTENNA_M, { atMs: START_MS }))
    const c0 = process.cpuUsage()
    const t0 = performance.now()
    const y = yardstick(ommSats, epochs, pts, ANTENNA_M / 1000, masks, MASK_DEG)
    const yWall = performance.now() - t0
    const yc = process.cpuUsage(c0)
    const yCpu = (yc.user + yc.system) / 1000
    // Agreement on the same samples (the yardstick uses satellite.js's own geodesy).
    const s = sgp.result.samples!
    let same = 0
    let maxH = 0
    for (let i = 0; i < y.hdop.length; i++) {
      if (y.satellites[i] === s.satellites[i]) {
        same++
        if (Number.isFinite(y.hdop[i])) maxH = Math.max(maxH, Math.abs(y.hdop[i] - s.hdop[i]))
      }
    }
    table('Yardstick on the SGP4 inputs (propagate, ecfToLookAngles, mathjs inverse; no N-1, no aggregation)', [
      ['propagation', ms(y.times.propagationMs)],
      ['look angles + masks', ms(y.times.lookAnglesMs)],
      ['DOP (mathjs inv)', ms(y.times.dopMs)],
      ['total (wall)', ms(yWall)],
      ['total (CPU time of this process)', ms(yCpu)],
      ['satellite-point evaluations/s', perS(y.evaluations, yWall)],
      ['samples with the same satellite count', `${((100 * same) / y.hdop.length).toFixed(2)} %`],
      ['max HDOP difference on those', maxH.toExponential(2)],
    ])
    table('Ratio (target: engine >= 5x faster; engine week <= 500 ms)', [
      ['yardstick / engine, same SGP4 inputs, wall', `${(yWall / sgp.wall).toFixed(1)} x`],
      ['yardstick / engine, same SGP4 inputs, CPU', `${(yCpu / sgp.cpu).toFixed(1)} x`],
      ['yardstick / engine (embedded nominal), wall', `${(yWall / kepler.wall).toFixed(1)} x`],
      ['engine week, embedded nominal, median wall / CPU', `${kepler.wall.toFixed(0)} ms / ${kepler.cpu.toFixed(0)} ms`],
      ['engine week, embedded nominal, best run wall', `${kepler.bestWall.toFixed(0)} ms`],
      ['engine week, embedded nominal, cold run wall', `${kepler.coldWall.toFixed(0)} ms`],
    ])
  }
}

main().catch((e) => {
  console.error(e)
  process.exit(1)
})
