/**
 * `npx tsx tests/bench/positions.bench.ts [--fields N]`: the lever of shared satellite
 * positions (server/jobs/positionCache.ts). N fields of one window (default 8, the
 * scenario's field shifted by a few km each) computed the way the engine worker computes
 * them (24-hour chunks), once propagating per field and once sharing the positions; for
 * the embedded nominal constellations (Keplerian, cheap to propagate) and for the same
 * constellations as SGP4 element sets (what an orbit feed delivers). Wall and CPU time
 * (process.cpuUsage) per field; the hours are compared for equality.
 *
 * A measurement, not a test: nothing here fails on a slow machine.
 */
import { parseArgs } from 'node:util'
import { loadavg } from 'node:os'
import { isDeepStrictEqual } from 'node:util'
import type { Satellite } from '../../shared/precision/orbits/types.ts'
import { runEngineTask } from '../../server/jobs/engineWorker.ts'
import { PositionMemo } from '../../server/jobs/positionCache.ts'
import type { EngineTask } from '../../server/forecast/inputs.ts'
import { DEMO_WORK_TYPES } from '../../shared/precision/index.ts'
import { ANTENNA_M, FIELD, HOURS, MASK_DEG, OBSTRUCTIONS, SAMPLE_COUNT, SIGMA_UERE_M, START_MS, STEP_MIN, nominalAsOmm, nominalSatellites } from './scenario.ts'

const { values } = parseArgs({ options: { fields: { type: 'string', default: '8' } } })
const N = Number(values.fields)

function taskFor(i: number, satellites: Satellite[]): EngineTask {
  const shift = i * 0.03
  const field = { ...FIELD, coordinates: FIELD.coordinates.map((ring) => ring.map(([x, y]) => [x + shift, y + shift / 2])) }
  return {
    field, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites, startMs: START_MS, hours: HOURS, stepMin: STEP_MIN,
    maskDeg: MASK_DEG, sigmaUereM: SIGMA_UERE_M, workTypes: DEMO_WORK_TYPES, sampleCount: SAMPLE_COUNT, chunkHours: 24,
  } as EngineTask
}

function runAll(satellites: Satellite[], memo: PositionMemo | null) {
  const hours: unknown[] = []
  const c0 = process.cpuUsage()
  const t0 = performance.now()
  for (let i = 0; i < N; i++) hours.push(runEngineTask(taskFor(i, satellites), () => {}, memo).hours)
  const wallMs = performance.now() - t0
  const c = process.cpuUsage(c0)
  return { hours, wallMs: wallMs / N, cpuMs: (c.user + c.system) / 1000 / N }
}

const rows: Array<[string, string]> = [['taken', `${new Date().toISOString()}, load average ${loadavg().map((l) => l.toFixed(1)).join(' / ')}`]]
for (const [label, sats] of [['nominal (Keplerian)', nominalSatellites()], ['SGP4 element sets', nominalAsOmm()]] as const) {
  runAll(sats, null) // warm-up
  const own = runAll(sats, null)
  const memo = new PositionMemo()
  const shared = runAll(sats, memo)
  rows.push(
    [`${label}: each field propagates, per field wall / CPU`, `${own.wallMs.toFixed(0)} ms / ${own.cpuMs.toFixed(0)} ms`],
    [`${label}: positions shared, per field wall / CPU`, `${shared.wallMs.toFixed(0)} ms / ${shared.cpuMs.toFixed(0)} ms (${memo.misses} chunks propagated, ${memo.hits} reused)`],
    [`${label}: hours identical`, String(isDeepStrictEqual(own.hours, shared.hours))],
  )
}
console.log(`\nShared satellite positions, ${N} fields of one window (168 h, 5 min, 64 points, 4 constellations)`)
console.log('| measure | value |\n| --- | --- |')
for (const [k, v] of rows) console.log(`| ${k} | ${v} |`)
