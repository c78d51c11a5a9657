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
  type PassNote,
  type PassPatch,
  type PassStatus,
  type PassStatusChange,
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

  /**
   * 409 when the caller's copy of the pass (its version) is older than the stored one,
   * naming who changed it and when, so that a change queued offline never silently
   * overwrites the office's (or another crew's) change.
   */
  function checkVersion(current: PassDetailRow, version: number | undefined) {
    if (version === undefined || version === current.version) return
    const who = current.statusChangedByName ? ` Its status is ${current.status}, set by ${current.statusChangedByName}.` : ` Its status is ${current.status}.`
    const when = localLabel(current.updatedAt.getTime(), current.timeZone)
    throw new HttpError(
      409,
      'pass_changed',
      `This pass (${current.workTypeName} on ${current.fieldName}) was changed on ${when} after your copy was loaded.${who} Your change was not applied; look at the pass as it is now and make it again if it still holds.`,
      { version: `The pass is at version ${current.version}; your copy was version ${version}.` },
    )
  }

  async function update(user: SessionUser, id: number, patch: PassPatch, options: { version?: number; appendNote?: string } = {}): Promise<Pass> {
    return bookingTransaction(async (repos) => {
      if (!(await repos.passes.lockPass(id))) throw notFound('The pass')
      const current = await load(repos, id)
      assertFarmVisible(user, current.farmId)
      checkVersion(current, options.version ?? patch.version)
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
        ...(status !== current.status ? { statusChangedAt: new Date(), statusChangedBy: user.id } : {}),
        ...(patch.notes !== undefined ? { notes: patch.notes } : {}),
      }
      if (options.appendNote) changes.notes = appendNote(changes.notes ?? current.notes, user, options.appendNote, current.timeZone)
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
          statusChangedAt: new Date(),
          statusChangedBy: user.id,
        })
        return toPass(await refreshRisk(repos, id))
      })
    },

    update,

    async cancel(user: SessionUser, id: number): Promise<Pass> {
      return setStatus(user, id, { status: 'cancelled', note: '' })
    },

    async done(user: SessionUser, id: number): Promise<Pass> {
      return setStatus(user, id, { status: 'done', note: '' })
    },

    setStatus,

    /** Adds a dated note from the field to the pass's notes. */
    async addNote(user: SessionUser, id: number, note: PassNote): Promise<Pass> {
      return update(user, id, {}, { version: note.version, appendNote: note.text })
    },
  }

  /**
   * Marks a pass planned, confirmed, started, done or cancelled, recording who and when.
   * Setting the status it already has only adds the note (a repeated offline send is
   * harmless). A cancelled pass is planned again before it is started or done.
   */
  async function setStatus(user: SessionUser, id: number, change: PassStatusChange): Promise<Pass> {
    const current = await load(store.repos, id)
    assertFarmVisible(user, current.farmId)
    const { status, note, version } = change
    if (current.status === status) {
      if (!note) return toPass(current)
      return update(user, id, {}, { version, appendNote: note })
    }
    if ((status === 'done' || status === 'started') && current.status === 'cancelled') {
      throw new HttpError(409, 'conflict', `A cancelled pass cannot be marked ${status}; plan it again first.`)
    }
    return update(user, id, { status }, { version, appendNote: note || undefined })
  }
}

/** The pass's notes with one more line: "[Thu 3 Dec 10:14 CST, Wade Ostrowski] text". */
export function appendNote(notes: string, user: Pick<SessionUser, 'name'>, text: string, timeZone: string, nowMs = Date.now()): string {
  const line = `[${localLabel(nowMs, timeZone)}, ${user.name}] ${text.trim()}`
  const joined = notes.trim() ? `${notes.trim()}\n${line}` : line
  return joined.length > 4000 ? joined.slice(joined.length - 4000) : joined
}
export type PassesService = ReturnType<typeof createPassesService>
