// Satellite outages: a satellite out of service from one instant to another. Office staff
// and admins keep them; forecasts leave the satellite out over the span. Every change emits
// 'outages.changed' with the satellites and the whole span affected (old and new).
import type { Outage, OutageInput, OutagePatch } from '../../shared/schemas/orbits.ts'
import type { OutageRow } from '../db/schema-planning.ts'
import { emit } from '../events.ts'
import { badRequest, notFound } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'

export function toOutage(row: OutageRow): Outage {
  return {
    id: row.id,
    satId: row.satId,
    from: row.fromAt.toISOString(),
    to: row.toAt.toISOString(),
    note: row.note,
    createdBy: row.createdBy,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

/** Longest outage accepted: beyond this a satellite is better left out of the orbit set. */
const MAX_SPAN_DAYS = 400

function checkSpan(fromAt: Date, toAt: Date): void {
  if (toAt.getTime() <= fromAt.getTime()) throw badRequest('The end must be after the start.', { to: 'The end must be after the start' })
  if (toAt.getTime() - fromAt.getTime() > MAX_SPAN_DAYS * 86_400_000) {
    const msg = `An outage spans at most ${MAX_SPAN_DAYS} days; for a satellite out for good, leave it out of the orbit set instead.`
    throw badRequest(msg, { to: msg })
  }
}

export function createOutagesService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async list(query: { from?: string }): Promise<Outage[]> {
      return (await store.repos.outages.list(query.from ? new Date(query.from) : undefined)).map(toOutage)
    },

    async create(userId: number, input: OutageInput): Promise<Outage> {
      const fromAt = new Date(input.from)
      const toAt = new Date(input.to)
      checkSpan(fromAt, toAt)
      const outage = await store.transaction(async (repos) => {
        const id = await repos.outages.insert({ satId: input.satId, fromAt, toAt, note: input.note, createdBy: userId })
        return toOutage((await repos.outages.findById(id))!)
      })
      void emit('outages.changed', { satIds: [outage.satId], fromMs: fromAt.getTime(), toMs: toAt.getTime() })
      return outage
    },

    async update(id: number, patch: OutagePatch): Promise<Outage> {
      const { before, after } = await store.transaction(async (repos) => {
        const row = await repos.outages.findById(id)
        if (!row) throw notFound('The outage')
        const fromAt = patch.from ? new Date(patch.from) : row.fromAt
        const toAt = patch.to ? new Date(patch.to) : row.toAt
        checkSpan(fromAt, toAt)
        await repos.outages.update(id, {
          ...(patch.satId !== undefined ? { satId: patch.satId } : {}),
          ...(patch.note !== undefined ? { note: patch.note } : {}),
          fromAt,
          toAt,
        })
        return { before: toOutage(row), after: toOutage((await repos.outages.findById(id))!) }
      })
      void emit('outages.changed', {
        satIds: [...new Set([before.satId, after.satId])],
        fromMs: Math.min(Date.parse(before.from), Date.parse(after.from)),
        toMs: Math.max(Date.parse(before.to), Date.parse(after.to)),
      })
      return after
    },

    async remove(id: number): Promise<void> {
      const row = await store.repos.outages.findById(id)
      if (!row || !(await store.repos.outages.delete(id))) throw notFound('The outage')
      void emit('outages.changed', { satIds: [row.satId], fromMs: row.fromAt.getTime(), toMs: row.toAt.getTime() })
    },
  }
}
export type OutagesService = ReturnType<typeof createOutagesService>
