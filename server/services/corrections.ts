// RTK base stations and correction networks: admins and office staff manage them; every
// signed-in role reads them, clients only the sources their farms' fields use. A field's
// choice of source (or the nearest reachable one) and what it means for its service level.
// Any change re-forecasts the fields (their link, baseline and closures may change).
import { errorBudget, linkEffect } from '../../shared/precision/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type {
  BaseStation,
  BaseStationInput,
  BaseStationPatch,
  CorrectionNetwork,
  CorrectionSources,
  FieldCorrection,
  FieldCorrectionInput,
  MountPoint,
  NetworkInput,
  NetworkPatch,
} from '../../shared/schemas/corrections.ts'
import { assertFarmVisible, visibleFarmIds } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { BaseStationRow, CorrectionNetworkRow } from '../db/schema-planning.ts'
import { emit } from '../events.ts'
import { badRequest, conflict, notFound } from '../http/errors.ts'
import { boundaryProblems } from '../imports/geometry.ts'
import { fieldLink, sourcesOf } from '../forecast/correctionInputs.ts'
import { rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const BASE_TAKEN = 'A base station with this name already exists.'
const NETWORK_TAKEN = 'A correction network with this name already exists.'

export function toBaseStation(row: BaseStationRow): BaseStation {
  return { id: row.id, name: row.name, latDeg: row.latDeg, lonDeg: row.lonDeg, antennaHeightM: row.antennaHeightM, radioRangeKm: row.radioRangeKm, note: row.note }
}

export function toNetwork(row: CorrectionNetworkRow): CorrectionNetwork {
  return {
    id: row.id,
    name: row.name,
    coverage: row.coverage ? JSON.parse(row.coverage) : null,
    mountPoints: JSON.parse(row.mountPointsJson) as MountPoint[],
    note: row.note,
  }
}

/** 400 naming where a coverage polygon crosses itself (or is otherwise unusable). */
function checkCoverage(coverage: NetworkInput['coverage'] | undefined): void {
  if (!coverage) return
  if (coverage.coordinates.length > 1) throw badRequest('A coverage area is one outline without holes.', { coverage: 'Draw the coverage area as one outline without holes.' })
  const problems = boundaryProblems(coverage).map((p) => p.replace(/the boundary/g, 'the coverage area'))
  if (problems.length) {
    const sentence = `${problems[0].charAt(0).toUpperCase()}${problems[0].slice(1)}.`
    throw badRequest(sentence, { coverage: sentence })
  }
}

const changed = () => void emit('planning.changed', { serviceLevelIds: 'all' })

function dup(message: string) {
  return (error: unknown): never => rethrowUniqueAsConflict(error, message, 'name')
}

const PROBLEM_TEXT = {
  'no-source': 'No RTK base station or correction network is set up, so RTK work cannot run on this field.',
  'out-of-range': (name: string, km: number, rangeKm: number | null) =>
    rangeKm === null
      ? `The field lies outside the coverage of ${name}: RTK hours are Closed.`
      : `The field reaches ${km.toFixed(1)} km from ${name}, beyond its ${rangeKm} km radio range: RTK hours are Closed.`,
  'baseline-limit': (name: string, km: number, maxKm: number) =>
    `The field reaches ${km.toFixed(1)} km from ${name}, past the ${maxKm} km baseline limit of its service level: RTK hours are Closed.`,
}

export function createCorrectionsService(ctx: ServiceContext) {
  const { store } = ctx

  /** The field's link and its meaning, from rows already read. */
  async function describe(repos: Repositories, fieldId: number): Promise<FieldCorrection> {
    const [field] = (await repos.corrections.fieldsForLinks()).filter((f) => f.id === fieldId)
    if (!field) throw notFound('The field')
    const [bases, networks, models] = await Promise.all([repos.corrections.listBases(), repos.corrections.listNetworks(), repos.corrections.serviceLevelModels()])
    const link = fieldLink(field, sourcesOf(bases, networks))
    const level = models.find((m) => m.id === field.serviceLevelId)!
    const model = { ...level, maxBaselineKm: level.maxBaselineKm ?? null }
    const effect = linkEffect(model, link)
    const budget = errorBudget({ hdop: 0, vdop: 0 }, model.sigmaUereM, effect)
    const rtkLevels = models.filter((m) => m.needsBase)
    const warnings: string[] = []
    let problem: FieldCorrection['problem'] = null
    // The warning speaks of the field's own service level, or of the RTK levels its work types use.
    const checked = model.needsBase ? [model] : rtkLevels.map((m) => ({ ...m, maxBaselineKm: m.maxBaselineKm ?? null }))
    for (const m of checked) {
      const e = linkEffect(m, link)
      if (!e.closedReason || problem) continue
      problem = e.closedReason
      if (e.closedReason === 'no-source') warnings.push(PROBLEM_TEXT['no-source'])
      else if (e.closedReason === 'out-of-range') {
        const base = link?.kind === 'base' ? bases.find((b) => b.id === link.id) : undefined
        warnings.push(PROBLEM_TEXT['out-of-range'](link!.name, link!.farthestKm, base ? base.radioRangeKm : null))
      } else warnings.push(PROBLEM_TEXT['baseline-limit'](link!.name, link!.farthestKm, m.maxBaselineKm!))
    }
    return {
      fieldId,
      choice: field.baseStationId ? { kind: 'base', id: field.baseStationId } : field.networkId ? { kind: 'network', id: field.networkId } : { kind: 'auto' },
      link,
      serviceLevel: {
        id: model.id,
        name: model.name,
        needsBase: model.needsBase,
        sigmaUereM: model.sigmaUereM,
        ppmH: model.ppmH,
        ppmV: model.ppmV,
        maxBaselineKm: model.maxBaselineKm,
        baselineH95M: budget.baselineH95M,
        baselineV95M: budget.baselineV95M,
      },
      warnings,
      problem,
    }
  }

  return {
    /** Every source for staff; for clients only those their farms' fields use. */
    async list(user: SessionUser): Promise<CorrectionSources> {
      const [bases, networks] = await Promise.all([store.repos.corrections.listBases(), store.repos.corrections.listNetworks()])
      const farmIds = visibleFarmIds(user)
      if (!farmIds) return { bases: bases.map(toBaseStation), networks: networks.map(toNetwork) }
      const sources = sourcesOf(bases, networks)
      const used = new Set((await store.repos.corrections.fieldsForLinks(farmIds)).map((f) => fieldLink(f, sources)).filter((l) => l !== null).map((l) => `${l.kind}:${l.id}`))
      return {
        bases: bases.filter((b) => used.has(`base:${b.id}`)).map(toBaseStation),
        networks: networks.filter((n) => used.has(`network:${n.id}`)).map(toNetwork),
      }
    },

    async createBase(input: BaseStationInput): Promise<BaseStation> {
      const row = await store
        .transaction(async (repos) => {
          if (await repos.corrections.baseNameTaken(input.name)) throw conflict(BASE_TAKEN, { name: BASE_TAKEN })
          return repos.corrections.findBase(await repos.corrections.insertBase(input))
        })
        .catch(dup(BASE_TAKEN))
      changed()
      return toBaseStation(row!)
    },

    async updateBase(id: number, patch: BaseStationPatch): Promise<BaseStation> {
      const row = await store
        .transaction(async (repos) => {
          if (!(await repos.corrections.findBase(id))) throw notFound('The base station')
          if (patch.name !== undefined && (await repos.corrections.baseNameTaken(patch.name, id))) throw conflict(BASE_TAKEN, { name: BASE_TAKEN })
          const changes = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined))
          if (Object.keys(changes).length) await repos.corrections.updateBase(id, changes)
          return repos.corrections.findBase(id)
        })
        .catch(dup(BASE_TAKEN))
      changed()
      return toBaseStation(row!)
    },

    async removeBase(id: number): Promise<void> {
      await store.transaction(async (repos) => {
        if (!(await repos.corrections.deleteBase(id))) throw notFound('The base station')
      })
      changed()
    },

    async createNetwork(input: NetworkInput): Promise<CorrectionNetwork> {
      checkCoverage(input.coverage)
      const row = await store
        .transaction(async (repos) => {
          if (await repos.corrections.networkNameTaken(input.name)) throw conflict(NETWORK_TAKEN, { name: NETWORK_TAKEN })
          const id = await repos.corrections.insertNetwork({
            name: input.name,
            coverage: input.coverage ? JSON.stringify(input.coverage) : null,
            mountPointsJson: JSON.stringify(input.mountPoints),
            note: input.note,
          })
          return repos.corrections.findNetwork(id)
        })
        .catch(dup(NETWORK_TAKEN))
      changed()
      return toNetwork(row!)
    },

    async updateNetwork(id: number, patch: NetworkPatch): Promise<CorrectionNetwork> {
      checkCoverage(patch.coverage)
      const row = await store
        .transaction(async (repos) => {
          const before = await repos.corrections.findNetwork(id)
          if (!before) throw notFound('The correction network')
          if (patch.name !== undefined && (await repos.corrections.networkNameTaken(patch.name, id))) throw conflict(NETWORK_TAKEN, { name: NETWORK_TAKEN })
          const after = { ...toNetwork(before), ...Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined)) } as CorrectionNetwork
          if (!after.coverage && after.mountPoints.length === 0) {
            throw badRequest('Give the network a coverage area or at least one mount point.', { coverage: 'Give the network a coverage area or at least one mount point.' })
          }
          await repos.corrections.updateNetwork(id, {
            ...(patch.name !== undefined ? { name: patch.name } : {}),
            ...(patch.note !== undefined ? { note: patch.note } : {}),
            ...(patch.coverage !== undefined ? { coverage: patch.coverage ? JSON.stringify(patch.coverage) : null } : {}),
            ...(patch.mountPoints !== undefined ? { mountPointsJson: JSON.stringify(patch.mountPoints) } : {}),
          })
          return repos.corrections.findNetwork(id)
        })
        .catch(dup(NETWORK_TAKEN))
      changed()
      return toNetwork(row!)
    },

    async removeNetwork(id: number): Promise<void> {
      await store.transaction(async (repos) => {
        if (!(await repos.corrections.deleteNetwork(id))) throw notFound('The correction network')
      })
      changed()
    },

    async fieldCorrection(user: SessionUser, fieldId: number): Promise<FieldCorrection> {
      const field = await store.repos.fields.findById(fieldId)
      if (!field) throw notFound('The field')
      assertFarmVisible(user, field.farmId)
      return describe(store.repos, fieldId)
    },

    async setFieldCorrection(user: SessionUser, fieldId: number, input: FieldCorrectionInput): Promise<FieldCorrection> {
      const { result, farmId } = await store.transaction(async (repos) => {
        const field = await repos.fields.findById(fieldId)
        if (!field) throw notFound('The field')
        assertFarmVisible(user, field.farmId)
        if (input.kind === 'base' && !(await repos.corrections.findBase(input.id))) {
          throw badRequest('That base station does not exist.', { id: 'Choose one of the base stations.' })
        }
        if (input.kind === 'network' && !(await repos.corrections.findNetwork(input.id))) {
          throw badRequest('That correction network does not exist.', { id: 'Choose one of the correction networks.' })
        }
        await repos.corrections.setFieldChoice(
          fieldId,
          { baseStationId: input.kind === 'base' ? input.id : null, networkId: input.kind === 'network' ? input.id : null },
          field.revision + 1,
        )
        return { result: await describe(repos, fieldId), farmId: field.farmId }
      })
      void emit('field.changed', { fieldId, farmId, deleted: false })
      return result
    },
  }
}
export type CorrectionsService = ReturnType<typeof createCorrectionsService>
