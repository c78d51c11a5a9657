// Orbit sets (uploaded or fetched orbit files), the active choice per constellation, and
// the orbit data served to browsers. Office staff and admins manage sets and choices;
// everyone signed in reads the orbit data (it is not farm data).
import { createHash } from 'node:crypto'
import { formatOrbitIssue, nominalConstellation, parseOrbitFile, type OrbitRecordIssue, type Satellite } from '../../shared/precision/index.ts'
import {
  ORBIT_AGE_WARNING_DAYS,
  gnssSystems,
  type ActiveOrbitState,
  type ActiveOrbitsPut,
  type GnssSystem,
  type OrbitData,
  type OrbitRecordProblem,
  type OrbitSet,
  type OrbitSetDetail,
  type OrbitUploadResult,
} from '../../shared/schemas/orbits.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { OrbitSatelliteRow, OrbitSetSummaryRow } from '../db/repositories/orbits.ts'
import { emit } from '../events.ts'
import { badRequest, conflict, HttpError, notFound } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'
import {
  NOMINAL_BY_SYSTEM,
  hasNominal,
  orbitDataForClients,
  readReport,
  resolveActive,
  satelliteEpochMs,
  type OrbitSetReport,
} from './orbitData.ts'

const DAY_MS = 86_400_000
/** How many problems a listed set carries (the detail has them all). */
const LIST_PROBLEMS = 20
/** How many per-record problems a refused upload names in `fields`. */
const REFUSAL_PROBLEMS = 50

const toProblem = (i: OrbitRecordIssue): OrbitRecordProblem => ({
  record: `record ${i.record}${i.satellite ? ` (${i.satellite})` : ''}`,
  line: i.line,
  message: i.message,
})

export function toOrbitSet(
  row: OrbitSetSummaryRow,
  systems: Record<string, number>,
  activeFor: GnssSystem[],
  nowMs: number,
  problemLimit = Infinity,
): OrbitSet {
  const report = readReport(row.reportJson)
  const ageDays = row.newestEpoch ? Math.max(0, (nowMs - row.newestEpoch.getTime()) / DAY_MS) : null
  return {
    id: row.id,
    name: row.name,
    source: row.source,
    format: row.format,
    satelliteCount: row.satelliteCount,
    skippedCount: row.skippedCount,
    problems: report.problems.slice(0, problemLimit),
    problemCount: report.problems.length,
    notes: report.notes.slice(0, problemLimit),
    oldestEpoch: row.oldestEpoch?.toISOString() ?? null,
    newestEpoch: row.newestEpoch?.toISOString() ?? null,
    ageDays: ageDays === null ? null : Math.round(ageDays * 10) / 10,
    // Common practice, not a standard: elements older than a week are flagged.
    ageWarning: ageDays !== null && ageDays > ORBIT_AGE_WARNING_DAYS,
    systems: systems as OrbitSet['systems'],
    fileSystem: report.fileSystem,
    activeFor,
    uploadedBy: row.uploadedBy,
    createdAt: row.createdAt.toISOString(),
  }
}

export interface ParsedOrbitFile {
  format: string
  satellites: Satellite[]
  rows: OrbitSatelliteRow[]
  report: OrbitSetReport
  oldestEpoch: Date | null
  newestEpoch: Date | null
}

/**
 * Reads an orbit file with the engine. 400 when the bytes are not text, the file is empty
 * or no record is usable (the message and `fields` name each refused record).
 */
export function readOrbitFile(buffer: Buffer, fileSystem: GnssSystem | null, nowMs: number, what = 'The file'): ParsedOrbitFile {
  if (buffer.length === 0 || buffer.toString('utf8').trim() === '') throw badRequest(`${what} is empty.`, { file: `${what} is empty.` })
  if (buffer.includes(0)) {
    const msg = `${what} is not a text file; upload TLE, OMM (JSON or XML) or YUMA almanac text.`
    throw badRequest(msg, { file: msg })
  }
  let text: string
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buffer)
  } catch {
    const msg = `${what} is not UTF-8 text; upload TLE, OMM (JSON or XML) or YUMA almanac text.`
    throw badRequest(msg, { file: msg })
  }
  const parsed = parseOrbitFile(text, fileSystem ? { system: fileSystem } : {})
  if (parsed.satellites.length === 0) {
    const n = parsed.errors.length
    const first = parsed.errors.slice(0, 3).map(formatOrbitIssue).join('; ')
    const message = n
      ? `No record in ${what.toLowerCase()} could be used (${n} refused): ${first}${n > 3 ? '; ...' : ''}.`
      : `${what} holds no orbit record.`
    const fields: Record<string, string> = { file: message }
    for (const e of parsed.errors.slice(0, REFUSAL_PROBLEMS)) {
      fields[`record ${e.record}`] = `line ${e.line}${e.satellite ? ` (${e.satellite})` : ''}: ${e.message}`
    }
    throw new HttpError(400, 'no_usable_record', message, fields)
  }
  const notes = parsed.notes.map(toProblem)
  const seen = new Set<string>()
  const rows: OrbitSatelliteRow[] = []
  const satellites: Satellite[] = []
  let oldest = Infinity
  let newest = -Infinity
  for (const s of parsed.satellites) {
    if (seen.has(s.id)) {
      notes.push({ record: `satellite ${s.id}`, line: 0, message: 'appears more than once; the first record is used' })
      continue
    }
    seen.add(s.id)
    const epochMs = satelliteEpochMs(s, nowMs)
    if (Number.isFinite(epochMs)) {
      oldest = Math.min(oldest, epochMs)
      newest = Math.max(newest, epochMs)
    }
    satellites.push(s)
    rows.push({ satId: s.id.slice(0, 32), name: (s.name ?? '').slice(0, 80), system: s.system, epoch: new Date(Number.isFinite(epochMs) ? epochMs : nowMs) })
  }
  return {
    format: parsed.format,
    satellites,
    rows,
    report: { problems: parsed.errors.map(toProblem), notes, fileSystem },
    oldestEpoch: Number.isFinite(oldest) ? new Date(oldest) : null,
    newestEpoch: Number.isFinite(newest) ? new Date(newest) : null,
  }
}

/** Stores a parsed orbit file as a new set (inside the caller's transaction). */
export async function insertOrbitSet(
  repos: Repositories,
  p: { name: string; source: 'upload' | 'feed'; content: string; parsed: ParsedOrbitFile; uploadedBy: number | null },
): Promise<number> {
  return repos.orbits.insertSet(
    {
      name: p.name,
      source: p.source,
      format: p.parsed.format,
      content: p.content,
      satelliteCount: p.parsed.rows.length,
      skippedCount: p.parsed.report.problems.length,
      reportJson: JSON.stringify(p.parsed.report),
      oldestEpoch: p.parsed.oldestEpoch,
      newestEpoch: p.parsed.newestEpoch,
      uploadedBy: p.uploadedBy,
    },
    p.parsed.rows,
  )
}

export function createOrbitsService(ctx: ServiceContext) {
  const { store } = ctx

  async function activeForMap(repos: Repositories): Promise<Map<number, GnssSystem[]>> {
    const map = new Map<number, GnssSystem[]>()
    for (const c of resolveActive(await repos.orbits.activeRows())) {
      if (c.orbitSetId !== null) map.set(c.orbitSetId, [...(map.get(c.orbitSetId) ?? []), c.system])
    }
    return map
  }

  async function activeState(repos: Repositories): Promise<ActiveOrbitState[]> {
    const choices = resolveActive(await repos.orbits.activeRows())
    const sets = await repos.orbits.listSets()
    const counts = await repos.orbits.systemCounts(sets.map((s) => s.id))
    const names = new Map(sets.map((s) => [s.id, s.name]))
    // Constellations without a nominal one are offered once some set has their satellites.
    const present = new Set<string>()
    for (const c of counts.values()) for (const system of Object.keys(c)) present.add(system)
    const out: ActiveOrbitState[] = []
    for (const system of gnssSystems) {
      const choice = choices.find((c) => c.system === system)
      if (!choice && !present.has(system)) continue
      const orbitSetId = choice?.orbitSetId ?? null
      out.push({
        system,
        orbitSetId,
        enabled: choice?.enabled ?? false,
        nominalAvailable: hasNominal(system),
        orbitSetName: orbitSetId !== null ? (names.get(orbitSetId) ?? null) : null,
        satelliteCount:
          orbitSetId !== null
            ? (counts.get(orbitSetId)?.[system] ?? 0)
            : hasNominal(system)
              ? nominalConstellation(NOMINAL_BY_SYSTEM[system]).length
              : 0,
      })
    }
    return out
  }

  return {
    async list(nowMs = Date.now()): Promise<OrbitSet[]> {
      const rows = await store.repos.orbits.listSets()
      const counts = await store.repos.orbits.systemCounts(rows.map((r) => r.id))
      const active = await activeForMap(store.repos)
      return rows.map((r) => toOrbitSet(r, counts.get(r.id) ?? {}, active.get(r.id) ?? [], nowMs, LIST_PROBLEMS))
    },

    async get(id: number, nowMs = Date.now()): Promise<OrbitSetDetail> {
      const row = await store.repos.orbits.findSet(id)
      if (!row) throw notFound('The orbit set')
      const counts = await store.repos.orbits.systemCounts([id])
      const active = await activeForMap(store.repos)
      const satellites = await store.repos.orbits.satellitesOf(id)
      return {
        ...toOrbitSet(row, counts.get(id) ?? {}, active.get(id) ?? [], nowMs),
        satellites: satellites.map((s) => ({
          id: s.satId,
          name: s.name,
          system: s.system as GnssSystem,
          epoch: s.epoch.toISOString(),
          ageDays: Math.round(((nowMs - s.epoch.getTime()) / DAY_MS) * 10) / 10,
        })),
      }
    },

    async upload(
      userId: number,
      input: { name: string; system?: GnssSystem },
      file: { buffer: Buffer } | undefined,
      nowMs = Date.now(),
    ): Promise<OrbitUploadResult> {
      if (!file) throw badRequest('Choose an orbit file to upload.', { file: 'Choose an orbit file to upload.' })
      const parsed = readOrbitFile(file.buffer, input.system ?? null, nowMs)
      const id = await store.transaction((repos) =>
        insertOrbitSet(repos, { name: input.name, source: 'upload', content: file.buffer.toString('utf8'), parsed, uploadedBy: userId }),
      )
      void emit('orbits.changed', { reason: `orbit set ${id} uploaded` })
      const orbitSet = (await this.list(nowMs)).find((s) => s.id === id)!
      return { orbitSet: { ...orbitSet, problems: parsed.report.problems, notes: parsed.report.notes }, skipped: parsed.report.problems.length }
    },

    async remove(id: number): Promise<void> {
      await store.transaction(async (repos) => {
        if (!(await repos.orbits.findSet(id))) throw notFound('The orbit set')
        const systems = await repos.orbits.isSetActive(id)
        if (systems.length) {
          throw conflict(`This orbit set is in use for ${systems.join(', ')}. Choose other orbit data for them first.`)
        }
        await repos.orbits.deleteSet(id)
      })
    },

    async active(): Promise<ActiveOrbitState[]> {
      return activeState(store.repos)
    },

    async setActive(list: ActiveOrbitsPut): Promise<ActiveOrbitState[]> {
      const result = await store.transaction(async (repos) => {
        await repos.orbits.lockActiveRows()
        const before = JSON.stringify(resolveActive(await repos.orbits.activeRows()))
        const setIds = [...new Set(list.map((a) => a.orbitSetId).filter((id): id is number => id !== null))]
        const counts = await repos.orbits.systemCounts(setIds)
        const existing = new Set((await repos.orbits.findSets(setIds)).map((s) => s.id))
        const fields: Record<string, string> = {}
        list.forEach((a, k) => {
          if (a.orbitSetId === null) {
            if (a.enabled && !hasNominal(a.system)) {
              fields[`${k}.orbitSetId`] = `${a.system} has no nominal constellation: choose an orbit set with ${a.system} satellites.`
            }
          } else if (!existing.has(a.orbitSetId)) {
            fields[`${k}.orbitSetId`] = `No orbit set with id ${a.orbitSetId}.`
          } else if (!(counts.get(a.orbitSetId)?.[a.system] ?? 0)) {
            fields[`${k}.orbitSetId`] = `Orbit set ${a.orbitSetId} has no ${a.system} satellites.`
          }
        })
        const keys = Object.keys(fields)
        if (keys.length) throw badRequest(fields[keys[0]], fields)
        for (const a of list) await repos.orbits.upsertActive(a)
        const after = JSON.stringify(resolveActive(await repos.orbits.activeRows()))
        return { changed: before !== after, state: await activeState(repos) }
      })
      if (result.changed) void emit('orbits.changed', { reason: 'active orbit data changed' })
      return result.state
    },

    async orbitData(nowMs = Date.now()): Promise<OrbitData> {
      return orbitDataForClients(store.repos, nowMs)
    },
  }
}
export type OrbitsService = ReturnType<typeof createOrbitsService>

/** A short hash of text (used for feed content names). */
export const shortHash = (text: string) => createHash('sha256').update(text).digest('hex').slice(0, 8)
