// Passes: every signed-in user lists and reads the passes of the farms they may see;
// admins, office staff and contractors book, change, cancel and finish them.
// A machine is never booked twice: the check runs inside the booking's transaction, after
// locking the machine row and reading its bookings in the span with FOR UPDATE, so two
// concurrent bookings of one machine run one after the other and the second gets 409.
import { MINUTE_MS, localDate, localLabel } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import {
  activePassStatuses,
  type Pass,
  type PassInput,
  type PassListQuery,
  type PassPatch,
  type PassStatus,
} from '../../shared/schemas/passes.ts'
import { assertFarmVisible, visibleFarmIds } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { NewPass, PassDetailRow } from '../db/repositories/passes.ts'
import { withDeadlockRetry } from '../db/retry.ts'
import type { FieldRow, MachineRow, WorkTypeRow } from '../db/schema-planning.ts'
import { badRequest, conflict, HttpError, notFound } from '../http/errors.ts'
import { assessPass } from './atRisk.ts'
import type { ServiceContext } from './context.ts'
import { toPass } from './passView.ts'
import { estimatedDuration } from './windows.ts'

/** "Planting on North 40 (Hollis Creek Farms), Thu 3 Dec 08:00 CST to 14:00 CST" */
export function describePass(p: Pick<PassDetailRow, 'workTypeName' | 'fieldName' | 'farmName' | 'startAt' | 'durationMin' | 'timeZone'>): string {
  const start = p.startAt.getTime()
  const end = start + p.durationMin * MINUTE_MS
  const endLabel = localLabel(end, p.timeZone)
  const sameDay = localDate(start, p.timeZone) === localDate(end, p.timeZone)
  return `${p.workTypeName} on ${p.fieldName} (${p.farmName}), ${localLabel(start, p.timeZone)} to ${sameDay ? endLabel.replace(/^\S+ \S+ \S+ /, '') : endLabel}`
}

interface Resolved {
  field: FieldRow
  workType: WorkTypeRow
  machine: MachineRow | null
}

export function createPassesService(ctx: ServiceContext) {
  const { store } = ctx

  /** Runs a booking transaction, again after a deadlock (the other booking has then committed). */
  const bookingTransaction = <T>(work: (repos: Repositories) => Promise<T>) => withDeadlockRetry(store, work, { attempts: 3 })

  /** Looks up what a pass refers to: 400 naming the field of the request that is wrong. */
  async function resolve(
    repos: Repositories,
    user: SessionUser,
    ids: { fieldId: number; workTypeId: number; machineId: number | null },
    current?: PassDetailRow,
  ): Promise<Resolved> {
    const field = await repos.fields.findById(ids.fieldId)
    if (!field || (user.role === 'client' && !user.farmIds.includes(field.farmId))) {
      throw badRequest(`No field with id ${ids.fieldId}.`, { fieldId: 'No such field.' })
    }
    const workType = await repos.workTypes.findById(ids.workTypeId)
    if (!workType) throw badRequest(`No work type with id ${ids.workTypeId}.`, { workTypeId: 'No such work type.' })
    if (!workType.active && current?.workTypeId !== workType.id) {
      throw badRequest(`The work type ${workType.name} is retired.`, { workTypeId: `${workType.name} is retired; choose another work type.` })
    }
    let machine: MachineRow | null = null
    if (ids.machineId !== null) {
      machine = await repos.machines.findById(ids.machineId)
      if (!machine) throw badRequest(`No machine with id ${ids.machineId}.`, { machineId: 'No such machine.' })
      if (!machine.active && current?.machineId !== machine.id) {
        throw badRequest(`The machine ${machine.name} is out of service.`, { machineId: `${machine.name} is out of service; choose another machine.` })
      }
    }
    return { field, workType, machine }
  }

  /**
   * Refuses the booking when the machine has another planned or confirmed pass in the span
   * (409 naming that pass). Locks the machine row first, then reads its bookings FOR UPDATE.
   */
  async function checkMachineFree(repos: Repositories, machine: MachineRow, startAt: Date, durationMin: number, exceptId?: number) {
    if (!(await repos.passes.lockMachine(machine.id))) throw badRequest(`No machine with id ${machine.id}.`, { machineId: 'No such machine.' })
    const end = new Date(startAt.getTime() + durationMin * MINUTE_MS)
    const [other] = await repos.passes.lockMachineBookings(machine.id, startAt, end, exceptId)
    if (!other) return
    const detail = await repos.passes.findById(other.id)
    const what = detail ? describePass(detail) : `pass ${other.id}`
    const message = `${machine.name} is already booked for ${what} (pass ${other.id}).`
    throw conflict(message, { machineId: message, start: 'Choose another start or another machine.' })
  }

  async function load(repos: Repositories, id: number): Promise<PassDetailRow> {
    const row = await repos.passes.findById(id)
    if (!row) throw notFound('The pass')
    return row
  }

  /** Writes the at-risk columns of a pass from the stored forecast (inside the transaction). */
  async function refreshRisk(repos: Repositories, id: number): Promise<PassDetailRow> {
    const row = await load(repos, id)
    const risk = await assessPass(repos, row, Date.now())
    await repos.passes.setRisk(id, risk)
    return { ...row, ...risk }
  }

  async function update(user: SessionUser, id: number, patch: PassPatch): Promise<Pass> {
    return bookingTransaction(async (repos) => {
      const current = await load(repos, id)
      assertFarmVisible(user, current.farmId)
      const ids = {
        fieldId: patch.fieldId ?? current.fieldId,
        workTypeId: patch.workTypeId ?? current.workTypeId,
        machineId: patch.machineId === undefined ? current.machineId : patch.machineId,
      }
      const { field, workType, machine } = await resolve(repos, user, ids, current)
      const startAt = patch.start !== undefined ? new Date(patch.start) : current.startAt
      const durationMin =
        patch.durationMin === null
          ? estimatedDuration(field, workType, machine)
          : (patch.durationMin ?? current.durationMin)
      const status: PassStatus = patch.status ?? current.status
      if (machine && activePassStatuses.includes(status)) await checkMachineFree(repos, machine, startAt, durationMin, id)
      const changes: Partial<NewPass> = {
        fieldId: ids.fieldId,
        workTypeId: ids.workTypeId,
        machineId: ids.machineId,
        startAt,
        durationMin,
        status,
        ...(patch.notes !== undefined ? { notes: patch.notes } : {}),
      }
      await repos.passes.update(id, changes)
      return toPass(await refreshRisk(repos, id))
    })
  }

  return {
    async list(user: SessionUser, query: PassListQuery): Promise<Pass[]> {
      if (query.farmId !== undefined) assertFarmVisible(user, query.farmId)
      const rows = await store.repos.passes.list({
        onlyFarmIds: visibleFarmIds(user),
        farmId: query.farmId,
        fieldId: query.fieldId,
        machineId: query.machineId,
        from: query.from ? new Date(query.from) : undefined,
        to: query.to ? new Date(query.to) : undefined,
        statuses: query.status,
      })
      return rows.map(toPass)
    },

    async get(user: SessionUser, id: number): Promise<Pass> {
      const row = await load(store.repos, id)
      // 404, not 403: a client does not learn that another farm's pass exists.
      if (user.role === 'client' && !user.farmIds.includes(row.farmId)) throw notFound('The pass')
      return toPass(row)
    },

    async create(user: SessionUser, input: PassInput): Promise<Pass> {
      return bookingTransaction(async (repos) => {
        const { field, workType, machine } = await resolve(repos, user, input)
        assertFarmVisible(user, field.farmId)
        const startAt = new Date(input.start)
        const durationMin = input.durationMin ?? estimatedDuration(field, workType, machine)
        if (machine) await checkMachineFree(repos, machine, startAt, durationMin)
        const id = await repos.passes.insert({
          fieldId: field.id,
          workTypeId: workType.id,
          machineId: machine?.id ?? null,
          startAt,
          durationMin,
          status: input.status,
          atRisk: false,
          atRiskReason: null,
          suggestedStartAt: null,
          notes: input.notes,
          createdBy: user.id,
        })
        return toPass(await refreshRisk(repos, id))
      })
    },

    update,

    async cancel(user: SessionUser, id: number): Promise<Pass> {
      return setStatus(user, id, 'cancelled')
    },

    async done(user: SessionUser, id: number): Promise<Pass> {
      return setStatus(user, id, 'done')
    },
  }

  async function setStatus(user: SessionUser, id: number, status: 'cancelled' | 'done'): Promise<Pass> {
    const current = await load(store.repos, id)
    assertFarmVisible(user, current.farmId)
    if (current.status === status) return toPass(current)
    if (status === 'done' && current.status === 'cancelled') {
      throw new HttpError(409, 'conflict', 'A cancelled pass cannot be marked done; plan it again first.')
    }
    return update(user, id, { status })
  }
}
export type PassesService = ReturnType<typeof createPassesService>
