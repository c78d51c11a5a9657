// The correction part of a field's forecast inputs: the field's RTK link (base station or
// network, baseline from the centroid and the farthest vertex), each service level's error
// model, the Kp blocks of the window and each work type's storm setting. Turned into the
// engine's extra inputs (baseline parts, closures, Kp blocks) and a version string that
// joins the inputs version, so a change of any of them re-forecasts the field.
import {
  chooseLink,
  fieldVertices,
  linkEffect,
  type CorrectionLink,
  type CorrectionSource,
  type ErrorModel,
  type KpBlock,
  type StormAction,
} from '../../shared/precision/index.ts'
import type { Store } from '../db/repositories/index.ts'
import type { BaseStationRow, CorrectionNetworkRow } from '../db/schema-planning.ts'
import type { EngineTask } from './inputs.ts'

export interface CorrectionInputs {
  sources: CorrectionSource[]
  models: Map<number, ErrorModel & { name: string }>
  kpBlocks: KpBlock[]
}

export interface FieldLinkInput {
  boundary: string
  centroidLat: number
  centroidLon: number
  baseStationId: number | null
  networkId: number | null
}

export function sourcesOf(bases: readonly BaseStationRow[], networks: readonly CorrectionNetworkRow[]): CorrectionSource[] {
  return [
    ...bases.map((b): CorrectionSource => ({ kind: 'base', id: b.id, name: b.name, latDeg: b.latDeg, lonDeg: b.lonDeg, radioRangeKm: b.radioRangeKm })),
    ...networks.map((n): CorrectionSource => {
      const coverage = n.coverage ? (JSON.parse(n.coverage) as { coordinates: Array<Array<[number, number]>> }).coordinates[0] : null
      const mountPoints = (JSON.parse(n.mountPointsJson) as Array<{ latDeg: number; lonDeg: number }>).map((m) => ({ latDeg: m.latDeg, lonDeg: m.lonDeg }))
      return { kind: 'network', id: n.id, name: n.name, coverage, mountPoints }
    }),
  ]
}

export async function loadCorrectionInputs(store: Store, window: { startMs: number; endMs: number }): Promise<CorrectionInputs> {
  const repos = store.repos.corrections
  const [bases, networks, levels, blocks] = await Promise.all([
    repos.listBases(),
    repos.listNetworks(),
    repos.serviceLevelModels(),
    repos.kpBlocksBetween(window.startMs, window.endMs),
  ])
  return {
    sources: sourcesOf(bases, networks),
    models: new Map(levels.map((l) => [l.id, { ...l, maxBaselineKm: l.maxBaselineKm ?? null }])),
    kpBlocks: blocks.map((b) => ({ startMs: b.blockStart.getTime(), endMs: b.blockEnd.getTime(), kp: b.kp })),
  }
}

/**
 * The inputs narrowed to one window: the Kp blocks that overlap it (as loadCorrectionInputs
 * reads them for that window), so inputs loaded once over several farms' windows give each
 * field the same version as its own job computes.
 */
export function correctionsWithin(inputs: CorrectionInputs, window: { startMs: number; endMs: number }): CorrectionInputs {
  return { ...inputs, kpBlocks: inputs.kpBlocks.filter((b) => b.endMs > window.startMs && b.startMs < window.endMs) }
}

/** The link a field uses (its choice, or the nearest reachable source). */
export function fieldLink(field: FieldLinkInput, sources: readonly CorrectionSource[]): CorrectionLink | null {
  const chosen = field.baseStationId ? { kind: 'base' as const, id: field.baseStationId } : field.networkId ? { kind: 'network' as const, id: field.networkId } : null
  return chooseLink({ latDeg: field.centroidLat, lonDeg: field.centroidLon }, fieldVertices(JSON.parse(field.boundary)), sources, chosen)
}

/** What the engine gets on top of the geometry inputs for one field. */
export interface FieldCorrection {
  link: CorrectionLink | null
  baselineHM: number
  baselineVM: number
  workTypes: Map<string, { baselineHM: number; baselineVM: number; closedReason: ReturnType<typeof linkEffect>['closedReason']; stormAction: StormAction }>
  kpBlocks: KpBlock[]
  /** canonical text of all of it, for the inputs version */
  version: string
}

const r6 = (v: number) => Math.round(v * 1e6) / 1e6

export function fieldCorrection(
  field: FieldLinkInput & { serviceLevelId: number },
  workTypes: ReadonlyArray<{ id: number; serviceLevelId: number; stormAction: StormAction }>,
  inputs: CorrectionInputs,
): FieldCorrection {
  const link = fieldLink(field, inputs.sources)
  const own = inputs.models.get(field.serviceLevelId)
  const ownEffect = own ? linkEffect(own, link) : { baselineHM: 0, baselineVM: 0, closedReason: null }
  const wt = new Map<string, FieldCorrection['workTypes'] extends Map<string, infer V> ? V : never>()
  for (const w of workTypes) {
    const model = inputs.models.get(w.serviceLevelId)
    const e = model ? linkEffect(model, link) : { baselineHM: 0, baselineVM: 0, closedReason: null }
    wt.set(String(w.id), { ...e, stormAction: w.stormAction })
  }
  const version = JSON.stringify({
    l: link ? [link.kind, link.id, r6(link.baselineKm), r6(link.farthestKm), link.reachable] : null,
    own: [r6(ownEffect.baselineHM), r6(ownEffect.baselineVM)],
    wt: [...wt.entries()].sort(([a], [b]) => Number(a) - Number(b)).map(([id, e]) => [id, r6(e.baselineHM), r6(e.baselineVM), e.closedReason, e.stormAction]),
    kp: inputs.kpBlocks.map((b) => [b.startMs, b.kp]),
  })
  return { link, baselineHM: ownEffect.baselineHM, baselineVM: ownEffect.baselineVM, workTypes: wt, kpBlocks: inputs.kpBlocks, version }
}

/** Adds the correction part to an engine task (work types matched by id). */
export function withCorrection(task: EngineTask, c: FieldCorrection): EngineTask {
  return {
    ...task,
    baselineHM: c.baselineHM,
    baselineVM: c.baselineVM,
    kpBlocks: c.kpBlocks,
    workTypes: (task.workTypes ?? []).map((w) => ({ ...w, ...(c.workTypes.get(w.id) ?? {}) })),
  }
}
