// The orbit data forecasts compute with: for each constellation the active choice (an
// uploaded or fetched orbit set, or the built-in nominal constellation), which
// constellations are enabled, and the satellite outages. Served to the browser (sky check)
// by GET /api/orbit-data and loaded as engine satellites by the forecast jobs through
// loadActiveSatellites().
import { createHash } from 'node:crypto'
import {
  GNSS_SYSTEMS,
  nominalConstellation,
  parseOrbitFile,
  resolveKeplerOrbit,
  satrecOf,
  type GnssSystem,
  type NominalName,
  type Outage as EngineOutage,
  type Satellite,
} from '../../shared/precision/index.ts'
import {
  nominalSystems,
  type OrbitData,
  type OrbitDataSource,
  type OrbitRecordProblem,
} from '../../shared/schemas/orbits.ts'
import type { Database } from '../db/index.ts'
import { createRepositories, type Repositories, type Store } from '../db/repositories/index.ts'
import type { ActiveOrbitRow } from '../db/repositories/orbits.ts'
import type { OrbitSetRow } from '../db/schema-planning.ts'

export const NOMINAL_BY_SYSTEM: Record<(typeof nominalSystems)[number], Exclude<NominalName, 'all'>> = {
  GPS: 'gps',
  GLONASS: 'glonass',
  Galileo: 'galileo',
  BeiDou: 'beidou',
}

export const hasNominal = (system: string): system is (typeof nominalSystems)[number] => system in NOMINAL_BY_SYSTEM

/** Outages that ended more than this long ago are left out of the orbit data. */
export const OUTAGE_LOOKBACK_MS = 24 * 3600 * 1000

/** What orbit_sets.report_json holds. Older rows may hold a bare array of problems. */
export interface OrbitSetReport {
  problems: OrbitRecordProblem[]
  notes: OrbitRecordProblem[]
  /** The constellation chosen at upload for every record, passed again when re-parsing. */
  fileSystem: GnssSystem | null
}

export function readReport(json: string): OrbitSetReport {
  try {
    const value = JSON.parse(json) as unknown
    if (Array.isArray(value)) return { problems: value as OrbitRecordProblem[], notes: [], fileSystem: null }
    const v = value as Partial<OrbitSetReport>
    return { problems: v.problems ?? [], notes: v.notes ?? [], fileSystem: v.fileSystem ?? null }
  } catch {
    return { problems: [], notes: [], fileSystem: null }
  }
}

/** The element epoch (UTC ms) of a satellite; almanacs are resolved near `nearMs`. */
export function satelliteEpochMs(s: Satellite, nearMs: number): number {
  if (s.orbit.kind === 'sgp4') {
    const rec = satrecOf(s.orbit)
    return Math.round((rec.jdsatepoch - 2_440_587.5) * 86_400_000)
  }
  return s.orbit.almanac ? resolveKeplerOrbit(s.orbit, nearMs).tRefMs : s.orbit.tRefMs
}

/** One choice per constellation: what is stored, with defaults for the nominal four. */
export interface ActiveChoice {
  system: GnssSystem
  orbitSetId: number | null
  enabled: boolean
}

/**
 * The active choice of every constellation that has one: stored rows, and for GPS,
 * GLONASS, Galileo and BeiDou without a row the nominal constellation, enabled.
 * A constellation without a nominal constellation and without a set is left out.
 */
export function resolveActive(rows: ActiveOrbitRow[]): ActiveChoice[] {
  const bySystem = new Map(rows.map((r) => [r.system, r]))
  const out: ActiveChoice[] = []
  for (const system of GNSS_SYSTEMS) {
    const row = bySystem.get(system)
    if (row) out.push({ system, orbitSetId: row.orbitSetId, enabled: row.enabled && (row.orbitSetId !== null || hasNominal(system)) })
    else if (hasNominal(system)) out.push({ system, orbitSetId: null, enabled: true })
  }
  return out
}

// Parsed orbit sets by id (sets never change once stored), so jobs do not re-parse files.
const parsedSets = new Map<number, Satellite[]>()
const PARSED_CACHE_SIZE = 16

function parsedSet(row: OrbitSetRow): Satellite[] {
  const cached = parsedSets.get(row.id)
  if (cached) return cached
  const { fileSystem } = readReport(row.reportJson)
  const satellites = parseOrbitFile(row.content, fileSystem ? { system: fileSystem } : {}).satellites
  parsedSets.set(row.id, satellites)
  if (parsedSets.size > PARSED_CACHE_SIZE) parsedSets.delete(parsedSets.keys().next().value!)
  return satellites
}

function toRepos(source: Database | Store | Repositories): Repositories {
  if ('orbits' in source && 'outages' in source) return source as Repositories
  if ('repos' in source) return (source as Store).repos
  return createRepositories(source as Database)
}

interface Assembled {
  choices: ActiveChoice[]
  sets: Map<number, OrbitSetRow>
  outages: EngineOutage[]
  version: string
}

async function assemble(repos: Repositories, nowMs: number): Promise<Assembled> {
  const choices = resolveActive(await repos.orbits.activeRows())
  const setIds = [...new Set(choices.filter((c) => c.enabled && c.orbitSetId !== null).map((c) => c.orbitSetId!))]
  const sets = new Map((await repos.orbits.findSets(setIds)).map((s) => [s.id, s]))
  const outages = (await repos.outages.list(new Date(nowMs - OUTAGE_LOOKBACK_MS))).map((o) => ({
    satId: o.satId,
    fromMs: o.fromAt.getTime(),
    toMs: o.toAt.getTime(),
  }))
  const fingerprint = {
    choices: choices.map((c) => {
      const set = c.orbitSetId !== null ? sets.get(c.orbitSetId) : undefined
      return [c.system, c.enabled, c.orbitSetId, set ? set.createdAt.getTime() : null]
    }),
    outages: outages.map((o) => [o.satId, o.fromMs, o.toMs]),
  }
  const version = createHash('sha256').update(JSON.stringify(fingerprint)).digest('hex').slice(0, 20)
  return { choices, sets, outages, version }
}

/** GET /api/orbit-data: the sources (files as stored), enabled constellations, outages. */
export async function orbitDataForClients(repos: Repositories, nowMs = Date.now()): Promise<OrbitData> {
  const { choices, sets, outages, version } = await assemble(repos, nowMs)
  const sources: OrbitDataSource[] = []
  for (const c of choices) {
    if (!c.enabled) continue
    const set = c.orbitSetId !== null ? sets.get(c.orbitSetId) : undefined
    if (set) {
      const { fileSystem } = readReport(set.reportJson)
      sources.push({
        system: c.system,
        kind: 'set',
        orbitSetId: set.id,
        name: set.name,
        format: set.format,
        content: set.content,
        parseOptions: fileSystem ? { system: fileSystem } : {},
      })
    } else if (hasNominal(c.system)) {
      sources.push({ system: c.system, kind: 'nominal', nominal: NOMINAL_BY_SYSTEM[c.system] })
    }
  }
  return { sources, enabledSystems: choices.filter((c) => c.enabled).map((c) => c.system), outages, version }
}

export interface ActiveSatellites {
  /** Engine satellites of every enabled constellation, ready for forecastField / skyView. */
  satellites: Satellite[]
  /** Outages ending after now minus one day, in the engine's shape. */
  outages: EngineOutage[]
  /** Hash of the active choices and outages; equal versions mean equal orbit inputs. */
  version: string
  enabledSystems: GnssSystem[]
  /** Per constellation what was used, e.g. { system: 'GPS', kind: 'set', orbitSetId: 4, name: '...', count: 31 }. */
  sources: Array<{ system: GnssSystem; kind: 'nominal' | 'set'; orbitSetId: number | null; name: string; count: number }>
  /** One line for people and for forecast_hours.orbit_summary (at most 255 characters). */
  summary: string
}

/**
 * Loads the orbit data in force: the satellites of every enabled constellation (from its
 * active orbit set, or the nominal constellation when none is chosen), the outages that
 * matter from now on, and a version string that changes whenever any of that changes.
 * Parsed orbit sets are cached per process (sets are immutable once stored).
 *
 * Accepts the Drizzle database, a Store or Repositories (e.g. inside a job's transaction).
 * `nowMs` (default Date.now()) only decides which past outages are dropped and resolves
 * almanac weeks elsewhere; it is a parameter so tests can pin it.
 *
 * @example
 * const { satellites, outages, version, summary } = await loadActiveSatellites(db)
 * const forecast = forecastField({ field, obstructions, satellites, outages, startMs, hours: 168, ... })
 * // store `version` in jobs.inputs_version / forecast_hours.inputs_version and `summary`
 * // in forecast_hours.orbit_summary; skip a recompute when the version did not change.
 */
export async function loadActiveSatellites(
  source: Database | Store | Repositories,
  options: { nowMs?: number } = {},
): Promise<ActiveSatellites> {
  const repos = toRepos(source)
  const { choices, sets, outages, version } = await assemble(repos, options.nowMs ?? Date.now())
  const satellites: Satellite[] = []
  const sources: ActiveSatellites['sources'] = []
  const seen = new Set<string>()
  for (const c of choices) {
    if (!c.enabled) continue
    const set = c.orbitSetId !== null ? sets.get(c.orbitSetId) : undefined
    let list: Satellite[]
    if (set) list = parsedSet(set).filter((s) => s.system === c.system)
    else if (hasNominal(c.system)) list = nominalConstellation(NOMINAL_BY_SYSTEM[c.system])
    else continue
    // A file may repeat a satellite; the first record is used once.
    list = list.filter((s) => !seen.has(s.id) && (seen.add(s.id), true))
    satellites.push(...list)
    sources.push({
      system: c.system,
      kind: set ? 'set' : 'nominal',
      orbitSetId: set?.id ?? null,
      name: set ? set.name : 'nominal',
      count: list.length,
    })
  }
  const summary = sources
    .map((s) => (s.kind === 'set' ? `${s.system}: ${s.name} (#${s.orbitSetId}, ${s.count})` : `${s.system}: nominal (${s.count})`))
    .join('; ')
    .slice(0, 255)
  return { satellites, outages, version, enabledSystems: choices.filter((c) => c.enabled).map((c) => c.system), sources, summary }
}
