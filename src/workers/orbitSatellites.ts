/**
 * Builds the engine's satellites from the API's orbit data (`GET /api/orbit-data`):
 * nominal constellations by name, uploaded sets parsed from their text. Pure apart from
 * the parse cache, so that it is unit-tested in Node.
 */
import { nominalConstellation, NOMINAL_NAMES, parseOrbitFile, type NominalName, type Satellite } from '@shared/precision'
import type { GnssSystem, OrbitData } from '@shared/schemas/orbits'
import type { OrbitInfo } from './skyProtocol'

const nominalBySystem: Partial<Record<GnssSystem, NominalName>> = {
  GPS: 'gps',
  GLONASS: 'glonass',
  Galileo: 'galileo',
  BeiDou: 'beidou',
}

/** The nominal constellation name of a source ('gps', 'nominal:gps', 'GPS' all work). */
export function nominalName(value: string | undefined, system: GnssSystem): NominalName | null {
  const v = (value ?? '').toLowerCase().replace(/^nominal:/, '')
  if ((NOMINAL_NAMES as readonly string[]).includes(v)) return v as NominalName
  return nominalBySystem[system] ?? null
}

export interface BuiltSatellites {
  satellites: Satellite[]
  info: OrbitInfo
}

/**
 * Satellites for every source of the orbit data: each source contributes only the
 * satellites of its constellation; a stored file is read with the server's parse options.
 */
export function satellitesFromOrbitData(data: OrbitData, cache = new Map<string, Satellite[]>()): BuiltSatellites {
  const satellites: Satellite[] = []
  const sources: OrbitInfo['sources'] = []
  for (const source of data.sources) {
    if (source.kind === 'nominal') {
      const name = nominalName(source.nominal, source.system)
      if (!name) continue
      const key = `nominal:${name}`
      let all = cache.get(key)
      if (!all) {
        all = nominalConstellation(name)
        cache.set(key, all)
      }
      satellites.push(...all.filter((s) => s.system === source.system))
      sources.push({ system: source.system, label: `${source.system} nominal`, nominal: true })
    } else {
      const key = `set:${source.orbitSetId}:${source.system}`
      let mine = cache.get(key)
      if (!mine) {
        // The server says how to read the file (the constellation chosen at upload, if any).
        mine = parseOrbitFile(source.content, source.parseOptions ?? {}).satellites.filter((s) => s.system === source.system)
        cache.set(key, mine)
      }
      satellites.push(...mine)
      sources.push({ system: source.system, label: `${source.system}: ${source.name}`, nominal: false })
    }
  }
  return {
    satellites,
    info: {
      version: data.version,
      sources,
      satelliteCount: satellites.length,
      fallback: null,
      enabledSystems: data.enabledSystems,
    },
  }
}

/** When the server's orbit data cannot be had: the four nominal constellations. */
export function nominalFallback(reason: string): BuiltSatellites {
  const satellites = nominalConstellation('all')
  const systems: GnssSystem[] = ['GPS', 'GLONASS', 'Galileo', 'BeiDou']
  return {
    satellites,
    info: {
      version: null,
      sources: systems.map((system) => ({ system, label: `${system} nominal`, nominal: true })),
      satelliteCount: satellites.length,
      fallback: reason,
      enabledSystems: systems,
    },
  }
}
