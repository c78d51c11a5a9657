/**
 * Command-line forecast: `npm run -s forecast -- --orbits FILE|nominal:gps|nominal:all ...`
 *
 * Point mode (no --field): one record per epoch, { "epochs": [...] }.
 * Field mode (--field): hourly aggregates, { "hours": [...] }.
 * --terrain FILE (GeoTIFF or ESRI ASCII grid; FILE.prj beside an ASCII grid names its CRS,
 * without one it is read as WGS-84 degrees, heights in metres): the terrain horizon joins the
 * obstructions; point mode JSON then also carries "terrainHorizon": [{ azimuthDeg, elevationDeg }]
 * (bin k covers azimuths [k, k+1)). --terrain-reach (m, default 5000) and --refraction (k,
 * default 0.13) default to the engine's values, the same as the server's.
 * Prints nothing but the result on stdout; skipped orbit records are listed on stderr.
 * Exit status 2 with a one-line message on bad arguments or unreadable orbit files.
 */
import { existsSync, readFileSync } from 'node:fs'
import { parseArgs } from 'node:util'
import type { Feature, FeatureCollection, Geometry, MultiPolygon, Polygon } from 'geojson'
import {
  DEMO_WORK_TYPES,
  forecastField,
  forecastPoint,
  formatOrbitIssue,
  NOMINAL_NAMES,
  nominalConstellation,
  parseOrbitFile,
  parseSystemName,
  type FieldGeometry,
  type GnssSystem,
  type HourAggregate,
  type NominalName,
  type PointEpoch,
  type Satellite,
} from '../../shared/precision/index'
import { createSgp4Options } from './propagator'
import { geometryBox, localTerrainGrid } from '../terrain/grid.ts'
import { readElevationModel, TerrainFileError } from '../terrain/readers.ts'
import { terrainHorizonInto, TERRAIN_MAX_DISTANCE_M, TERRAIN_REFRACTION_K, type TerrainGrid } from '../../shared/precision/index'
import { fieldBaseline, parseBaseArgs, pointBaseline } from './baselineArgs'

const USAGE =
  'usage: npm run -s forecast -- --orbits FILE|nominal:gps|nominal:all [--orbits ...] --lat DEG --lon DEG ' +
  '[--height M] [--start ISO8601] [--hours N] [--step MIN] [--mask DEG] [--systems GPS,GLONASS,Galileo,BeiDou] ' +
  '[--weights none|elevation] [--field FILE.geojson --obstructions FILE.geojson --antenna-height M] ' +
  '[--terrain FILE.tif|FILE.asc [--terrain-reach M] [--refraction K]] ' +
  '[--sigma M] [--samples N] [--base LAT,LON[,HEIGHT_M] [--ppm-h MM_PER_KM] [--ppm-v MM_PER_KM] [--max-baseline-km KM]] [--format json|csv]'

class UsageError extends Error {}

function fail(message: string): never {
  process.stderr.write(`forecast: ${message.replace(/\s*\n\s*/g, ' ')}\n`)
  process.exit(2)
}

function num(name: string, value: string | undefined, fallback: number, check: (v: number) => boolean, rule: string): number {
  if (value === undefined) return fallback
  const v = Number(value)
  if (value.trim() === '' || !Number.isFinite(v) || !check(v)) throw new UsageError(`--${name} ${value}: ${rule}`)
  return v
}

function readJson(name: string, file: string): unknown {
  let text: string
  try {
    text = readFileSync(file, 'utf8')
  } catch (e) {
    throw new UsageError(`--${name} ${file}: cannot read (${(e as NodeJS.ErrnoException).code ?? String(e)})`)
  }
  try {
    return JSON.parse(text)
  } catch (e) {
    throw new UsageError(`--${name} ${file}: not valid JSON (${(e as Error).message})`)
  }
}

function fieldGeometry(file: string): FieldGeometry {
  const data = readJson('field', file) as Feature | FeatureCollection | Geometry
  const isArea = (g: Geometry | null | undefined): g is Polygon | MultiPolygon => g?.type === 'Polygon' || g?.type === 'MultiPolygon'
  if (data?.type === 'FeatureCollection') {
    const f = data.features.find((x) => isArea(x.geometry))
    if (!f) throw new UsageError(`--field ${file}: no Polygon or MultiPolygon feature`)
    return f.geometry as Polygon | MultiPolygon
  }
  if (data?.type === 'Feature') {
    if (!isArea(data.geometry)) throw new UsageError(`--field ${file}: the feature is not a Polygon or MultiPolygon`)
    return data.geometry
  }
  if (isArea(data as Geometry)) return data as Polygon | MultiPolygon
  throw new UsageError(`--field ${file}: expected a GeoJSON Polygon or MultiPolygon`)
}

/** The elevation model FILE (GeoTIFF or ESRI ASCII grid, FILE.prj beside it if any) as the engine's grid around `geometry`. */
async function loadTerrain(file: string, geometry: { coordinates: unknown }, reachM: number): Promise<TerrainGrid> {
  let bytes: Buffer
  try {
    bytes = readFileSync(file)
  } catch (e) {
    throw new UsageError(`--terrain ${file}: cannot read (${(e as NodeJS.ErrnoException).code ?? String(e)})`)
  }
  const prjPath = [file.replace(/\.[^./\\]+$/, '.prj'), `${file}.prj`].find((p) => p !== file && existsSync(p))
  try {
    const model = await readElevationModel(new Uint8Array(bytes), { prjText: prjPath ? readFileSync(prjPath, 'utf8') : null })
    return localTerrainGrid(model, geometryBox(geometry), reachM)
  } catch (e) {
    if (e instanceof TerrainFileError) throw new UsageError(`--terrain ${file}: ${e.message}`)
    throw e
  }
}

function loadOrbits(sources: string[], system: GnssSystem | undefined): Satellite[] {
  const sats: Satellite[] = []
  for (const src of sources) {
    if (src.startsWith('nominal:')) {
      const name = src.slice('nominal:'.length).toLowerCase()
      if (!(NOMINAL_NAMES as readonly string[]).includes(name)) {
        throw new UsageError(`--orbits ${src}: unknown nominal constellation (use ${NOMINAL_NAMES.map((n) => `nominal:${n}`).join(', ')})`)
      }
      sats.push(...nominalConstellation(name as NominalName))
      continue
    }
    let text: string
    try {
      text = readFileSync(src, 'utf8')
    } catch (e) {
      throw new UsageError(`--orbits ${src}: cannot read (${(e as NodeJS.ErrnoException).code ?? String(e)})`)
    }
    const result = parseOrbitFile(text, { system })
    if (result.satellites.length === 0) {
      const first = result.errors[0]
      const more = result.errors.length > 1 ? `; ${result.errors.length - 1} more record(s) skipped` : ''
      throw new UsageError(`--orbits ${src}: no usable satellite${first ? ` (${formatOrbitIssue(first)}${more})` : ''}`)
    }
    // Warnings on stderr; the forecast goes on with the good records.
    for (const issue of result.errors) process.stderr.write(`forecast: ${src}: skipped ${formatOrbitIssue(issue)}\n`)
    for (const note of result.notes) process.stderr.write(`forecast: ${src}: ${formatOrbitIssue(note)}\n`)
    sats.push(...result.satellites)
  }
  return sats
}

function csvCell(v: unknown): string {
  if (v === null || v === undefined) return ''
  const s = Array.isArray(v) ? v.join(' ') : String(v)
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
}

function pointCsv(epochs: PointEpoch[]): string {
  const cols = ['time', 'satellites', 'ids', 'gdop', 'pdop', 'hdop', 'vdop', 'tdop'] as const
  const rows = epochs.map((e) => cols.map((c) => csvCell(e[c])).join(','))
  return [cols.join(','), ...rows].join('\n') + '\n'
}

function fieldCsv(hours: HourAggregate[]): string {
  const wt = hours[0]?.workTypes.map((w) => w.id) ?? []
  const head = [
    'time', 'samples', 'noFixShare', 'satellitesMin', 'satellitesMedian', 'hdopMedian', 'hdopMax', 'vdopMedian', 'vdopMax',
    'pdopMax', 'n1HdopMax', 'h95MedianM', 'h95MaxM', 'v95MedianM', 'v95MaxM',
    ...wt.flatMap((id) => [`${id}.share`, `${id}.shareN1`, `${id}.state`]),
  ]
  const rows = hours.map((h) =>
    [
      h.time, h.samples, h.noFixShare, h.satellites.min, h.satellites.median, h.hdop.median, h.hdop.max, h.vdop.median, h.vdop.max,
      h.pdopMax, h.n1HdopMax, h.h95M.median, h.h95M.max, h.v95M.median, h.v95M.max,
      ...h.workTypes.flatMap((w) => [w.share, w.shareN1, w.state]),
    ].map(csvCell).join(','),
  )
  return [head.join(','), ...rows].join('\n') + '\n'
}

/**
 * `--lon -93.6` is how people write western longitudes; node's parseArgs would read -93.6
 * as an option, so a negative number after an option is joined to it (`--lon=-93.6`).
 */
export function joinNegativeValues(argv: readonly string[]): string[] {
  const out: string[] = []
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i]
    const next = argv[i + 1]
    if (/^--[a-z-]+$/.test(arg) && next !== undefined && /^-(\d|\.\d)/.test(next)) {
      out.push(`${arg}=${next}`)
      i++
    } else out.push(arg)
  }
  return out
}

async function main(argv: string[]): Promise<void> {
  let values: Record<string, string | string[] | boolean | undefined>
  try {
    values = parseArgs({
      args: joinNegativeValues(argv),
      strict: true,
      allowPositionals: false,
      options: {
        orbits: { type: 'string', multiple: true },
        lat: { type: 'string' },
        lon: { type: 'string' },
        height: { type: 'string' },
        start: { type: 'string' },
        hours: { type: 'string' },
        step: { type: 'string' },
        mask: { type: 'string' },
        systems: { type: 'string' },
        system: { type: 'string' },
        weights: { type: 'string' },
        field: { type: 'string' },
        obstructions: { type: 'string' },
        'antenna-height': { type: 'string' },
        terrain: { type: 'string' },
        'terrain-reach': { type: 'string' },
        refraction: { type: 'string' },
        sigma: { type: 'string' },
        samples: { type: 'string' },
        format: { type: 'string' },
        propagator: { type: 'string' },
        base: { type: 'string' },
        'ppm-h': { type: 'string' },
        'ppm-v': { type: 'string' },
        'max-baseline-km': { type: 'string' },
        help: { type: 'boolean' },
      },
    }).values
  } catch (e) {
    throw new UsageError(`${(e as Error).message} (${USAGE})`)
  }
  if (values.help) {
    process.stdout.write(`${USAGE}\n`)
    return
  }
  const orbits = (values.orbits as string[] | undefined) ?? []
  if (orbits.length === 0) throw new UsageError(`--orbits is required (${USAGE})`)
  const field = values.field as string | undefined
  if (!field && (values.lat === undefined || values.lon === undefined)) throw new UsageError('--lat and --lon are required in point mode')
  const lat = num('lat', values.lat as string | undefined, NaN, (v) => v >= -90 && v <= 90, 'latitude must be in [-90, 90] degrees')
  const lon = num('lon', values.lon as string | undefined, NaN, (v) => v >= -180 && v <= 360, 'longitude must be in [-180, 360] degrees')
  const heightM = num('height', values.height as string | undefined, 0, (v) => v > -1000 && v < 10000, 'height must be in metres')
  let startMs: number
  if (values.start !== undefined) {
    const s = values.start as string
    if (!/^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/.test(s) || Number.isNaN(Date.parse(s))) {
      throw new UsageError(`--start ${s}: not an ISO 8601 time`)
    }
    startMs = Date.parse(/T.*(Z|[+-]\d{2}:?\d{2})$/.test(s) || !s.includes('T') ? s : `${s}Z`)
  } else {
    startMs = Math.floor(Date.now() / 60_000) * 60_000
  }
  const hours = num('hours', values.hours as string | undefined, 24, (v) => v > 0 && v <= 744, 'hours must be > 0 and at most 744')
  const stepMin = num('step', values.step as string | undefined, 5, (v) => v > 0 && v <= 60, 'step must be > 0 and at most 60 minutes')
  const maskDeg = num('mask', values.mask as string | undefined, 10, (v) => v >= 0 && v < 90, 'mask must be in [0, 90) degrees')
  const weights = (values.weights as string | undefined) ?? 'none'
  if (weights !== 'none' && weights !== 'elevation') throw new UsageError(`--weights ${weights}: use none or elevation`)
  const format = (values.format as string | undefined) ?? 'json'
  if (format !== 'json' && format !== 'csv') throw new UsageError(`--format ${format}: use json or csv`)
  let systems: GnssSystem[] | undefined
  if (values.systems !== undefined) {
    systems = (values.systems as string).split(',').map((t) => {
      const s = parseSystemName(t)
      if (!s) throw new UsageError(`--systems: unknown constellation "${t}" (use GPS, GLONASS, Galileo, BeiDou, QZSS, SBAS, Other)`)
      return s
    })
  }
  let fileSystem: GnssSystem | undefined
  if (values.system !== undefined) {
    const s = parseSystemName(values.system as string)
    if (!s) throw new UsageError(`--system ${String(values.system)}: unknown constellation`)
    fileSystem = s
  }
  const antennaHeightM = num('antenna-height', values['antenna-height'] as string | undefined, 0, (v) => v >= 0 && v < 100, 'antenna height must be in [0, 100) m')
  const sigmaUereM = num('sigma', values.sigma as string | undefined, 3.0, (v) => v > 0 && v < 100, 'sigma must be > 0 m')
  const sampleCount = num('samples', values.samples as string | undefined, 64, (v) => Number.isInteger(v) && v >= 1 && v <= 4096, 'samples must be an integer in [1, 4096]')
  const obstructions = values.obstructions !== undefined ? (readJson('obstructions', values.obstructions as string) as FeatureCollection) : null
  if (obstructions && obstructions.type !== 'FeatureCollection') throw new UsageError(`--obstructions ${String(values.obstructions)}: expected a GeoJSON FeatureCollection`)
  const reachM = num('terrain-reach', values['terrain-reach'] as string | undefined, TERRAIN_MAX_DISTANCE_M, (v) => v > 0 && v <= 50_000, 'reach must be in (0, 50000] m')
  const refractionK = num('refraction', values.refraction as string | undefined, TERRAIN_REFRACTION_K, (v) => v >= 0 && v < 1, 'refraction coefficient must be in [0, 1)')
  const terrainFile = values.terrain as string | undefined
  const terrainGeometry = field ? fieldGeometry(field) : { type: 'Point', coordinates: [lon, lat] }
  const terrainGrid = terrainFile ? await loadTerrain(terrainFile, terrainGeometry as { coordinates: unknown }, reachM) : null
  const terrainOptions = { maxDistanceM: reachM, refractionK }
  let baseArgs
  try {
    baseArgs = parseBaseArgs(values as Parameters<typeof parseBaseArgs>[0])
  } catch (e) {
    throw new UsageError((e as Error).message)
  }
  const satellites = loadOrbits(orbits, fileSystem)
  const epochCount = Math.floor((hours * 60) / stepMin) + 1
  let propagation
  try {
    propagation = await createSgp4Options(satellites, (values.propagator as string | undefined) ?? 'auto', epochCount)
  } catch (e) {
    throw new UsageError((e as Error).message)
  }

  try {
    if (!field) {
      let terrain = null
      let terrainHorizon: Array<{ azimuthDeg: number; elevationDeg: number }> | undefined
      if (terrainGrid) {
        const bins = new Float64Array(360)
        const ground = terrainHorizonInto(bins, terrainGrid, { latDeg: lat, lonDeg: lon }, antennaHeightM, terrainOptions)
        if (!Number.isFinite(ground)) throw new UsageError(`--terrain ${terrainFile}: the elevation model has no height at ${lat}, ${lon}`)
        terrain = { grid: null, pointHorizonsDeg: bins }
        terrainHorizon = Array.from(bins, (v, k) => ({ azimuthDeg: k, elevationDeg: Math.round(v * 1000) / 1000 }))
      }
      const epochs = forecastPoint({
        point: { latDeg: lat, lonDeg: lon, heightM },
        satellites, startMs, hours, stepMin, maskDeg, systems, weights, obstructions, antennaHeightM, propagation, terrain,
      })
      const extra = baseArgs ? pointBaseline(baseArgs, { latDeg: lat, lonDeg: lon }) : {}
      const out = terrainHorizon ? { ...extra, epochs, terrainHorizon } : { ...extra, epochs }
      process.stdout.write(format === 'csv' ? pointCsv(epochs) : `${JSON.stringify(out, null, 2)}\n`)
    } else {
      const geometry = fieldGeometry(field)
      const link = baseArgs ? fieldBaseline(baseArgs, geometry, DEMO_WORK_TYPES) : null
      const result = forecastField({
        field: geometry,
        obstructions, antennaHeightM, satellites, startMs, hours, stepMin, maskDeg, systems, weights, heightM,
        sigmaUereM, workTypes: link?.workTypes ?? DEMO_WORK_TYPES, sampleCount, propagation,
        terrain: terrainGrid ? { grid: terrainGrid, options: terrainOptions } : null,
        baselineHM: link?.baselineHM, baselineVM: link?.baselineVM,
      })
      const extra = link ? { baselineKm: link.baselineKm, farthestKm: link.farthestKm } : {}
      process.stdout.write(format === 'csv' ? fieldCsv(result.hours) : `${JSON.stringify({ ...extra, hours: result.hours }, null, 2)}\n`)
    }
  } catch (e) {
    // Bad geometry or settings found by the engine are argument errors too.
    throw new UsageError((e as Error).message)
  }
}

main(process.argv.slice(2)).catch((e: unknown) => {
  if (e instanceof UsageError) fail(e.message)
  process.stderr.write(`forecast: ${e instanceof Error ? e.message : String(e)}\n`)
  process.exit(1)
})
