/**
 * Golden-file tests of the field forecast: tests/fixtures/precision/forecast/*.in.json
 * -> *.out.json. The outputs are regenerated only on purpose:
 *   UPDATE_GOLDEN=1 npx vitest run tests/unit/precision/golden.test.ts
 * and the diff is reviewed before committing. The cases were checked when written by
 * the independent hot-loop cross-check in forecast.test.ts and by hand (see below).
 */
import { readdirSync, readFileSync, writeFileSync } from 'node:fs'
import type { FeatureCollection } from 'geojson'
import { describe, expect, it } from 'vitest'
import {
  DEMO_WORK_TYPES,
  forecastField,
  nominalConstellation,
  parseOrbitFile,
  type FieldGeometry,
  type NominalName,
  type Satellite,
  type WorkType,
} from '@shared/precision'

const dir = new URL('../../fixtures/precision/forecast/', import.meta.url)

interface GoldenInput {
  description: string
  orbits: string[]
  field: FieldGeometry
  obstructions: FeatureCollection
  settings: Record<string, unknown> & { startMs: number; hours: number; sigmaUereM: number }
  workTypes: 'demo' | WorkType[]
}

function loadSatellites(sources: string[]): Satellite[] {
  return sources.flatMap((src) => {
    if (src.startsWith('nominal:')) return nominalConstellation(src.slice(8) as NominalName)
    const r = parseOrbitFile(readFileSync(new URL(src, dir), 'utf8'))
    expect(r.errors).toEqual([])
    return r.satellites
  })
}

function run(input: GoldenInput) {
  const result = forecastField({
    ...(input.settings as object),
    field: input.field,
    obstructions: input.obstructions,
    satellites: loadSatellites(input.orbits),
    workTypes: input.workTypes === 'demo' ? DEMO_WORK_TYPES : input.workTypes,
  } as unknown as Parameters<typeof forecastField>[0])
  // Plain data only (what a worker would post back).
  return JSON.parse(
    JSON.stringify({ hours: result.hours, samplePoints: result.samplePoints, areaM2: result.areaM2, epochs: result.epochs, detail: result.detail }),
  )
}

const cases = readdirSync(dir).filter((f) => f.endsWith('.in.json'))

describe('field forecast golden files', () => {
  it('has cases', () => expect(cases.length).toBeGreaterThanOrEqual(2))

  for (const file of cases) {
    it(file.replace('.in.json', ''), () => {
      const input = JSON.parse(readFileSync(new URL(file, dir), 'utf8')) as GoldenInput
      const out = run(input)
      const outUrl = new URL(file.replace('.in.json', '.out.json'), dir)
      if (process.env.UPDATE_GOLDEN === '1') writeFileSync(outUrl, `${JSON.stringify(out, null, 1)}\n`)
      const expected = JSON.parse(readFileSync(outUrl, 'utf8'))
      expect(out).toEqual(expected)
    })
  }

  it('shelterbelt case: the hours follow the settings and the leafless woodlot stops blocking on 11-20', () => {
    const input = JSON.parse(readFileSync(new URL('shelterbelt-week.in.json', dir), 'utf8')) as GoldenInput
    const out = run(input)
    expect(out.hours).toHaveLength(30)
    expect(out.hours[0].time).toBe('2026-11-19T00:00:00.000Z')
    expect(out.hours[0].samples).toBe(12 * 32)
    // Horizon of the sample point nearest the woodlot: in leaf on 11-19 (detail hour).
    const east = out.detail.points.reduce((a: { lonDeg: number }, b: { lonDeg: number }) => (b.lonDeg > a.lonDeg ? b : a))
    expect(east.horizonMaxDeg).toBeGreaterThan(10)
  })
})
