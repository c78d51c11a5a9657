// Demo passes for the coming days on the demo fields with the demo machines: fall
// strip-till, tile drainage, a spraying pass and bench levelling, some confirmed, some
// planned, one without a machine yet. Invented like the rest of the scenario.
//
// Times are relative to today in each farm's time zone (day 1 = tomorrow), so the demo
// always shows a live week. Idempotent: passes are added only while none of the demo
// fields has a planned or confirmed pass that has not ended yet; a pass whose machine is
// already booked at that time, or whose field, work type or machine the admin has since
// removed, is left out. All in one transaction.
import { DateTime } from 'luxon'
import { MINUTE_MS, estimateDurationMin } from '../shared/planning/index.ts'
import type { Database } from '../server/db/index.ts'
import { createStore, type Repositories } from '../server/db/repositories/index.ts'
import { demoFarms } from './scenario.ts'

interface DemoPass {
  farm: string
  field: string
  workType: string
  machine: string | null
  /** days after today (farm time) */
  day: number
  /** local start, HH:mm */
  at: string
  /** minutes; estimated from area and rate when left out */
  durationMin?: number
  status: 'planned' | 'confirmed'
  notes: string
}

export const demoPasses: DemoPass[] = [
  { farm: 'north', field: 'East Eighty', workType: 'Strip-till', machine: 'Tractor 22 · strip-till bar', day: 1, at: '08:00', status: 'confirmed', notes: 'Fall strip-till into corn stalks; start on the west headland.' },
  { farm: 'north', field: 'Creek Bottom', workType: 'Tile drainage', machine: 'Tile plow 1 · tracked', day: 2, at: '08:30', durationMin: 480, status: 'confirmed', notes: 'Mains first, laterals on the second day if the ground stays open.' },
  { farm: 'north', field: 'Home Quarter', workType: 'Strip-till', machine: 'Tractor 22 · strip-till bar', day: 3, at: '08:00', durationMin: 420, status: 'planned', notes: 'North headland last: the shelterbelt shades it in the morning.' },
  { farm: 'south', field: 'Ferry Field', workType: 'Spraying', machine: 'Sprayer 3 · 36 m boom', day: 1, at: '09:30', status: 'confirmed', notes: 'Burndown before the wheat greens up; wind under 15 km/h.' },
  { farm: 'south', field: 'Pecan Grove West', workType: 'Strip-till', machine: 'Tractor 14 · 16-row planter', day: 1, at: '08:00', durationMin: 300, status: 'confirmed', notes: 'West headland last: the pecan grove shades it until late morning.' },
  { farm: 'south', field: 'Sorghum Quarter', workType: 'Strip-till', machine: 'Tractor 14 · 16-row planter', day: 4, at: '08:00', durationMin: 360, status: 'planned', notes: 'First half of the quarter; finish on day 5 if the window holds.' },
  { farm: 'plains', field: 'Dryland Strip A', workType: 'Spraying', machine: 'Sprayer 3 · 36 m boom', day: 2, at: '10:00', status: 'planned', notes: '' },
  { farm: 'valley', field: 'Bench One', workType: 'Land levelling', machine: null, day: 3, at: '09:00', durationMin: 420, status: 'planned', notes: 'Crew to be assigned; design grade file from the surveyor.' },
]

export interface PassSeedResult {
  passes: number
  skipped: string[]
}

/** Writes the demo passes relative to `nowMs` through the repositories. */
export async function seedPassesWith(repos: Repositories, nowMs = Date.now()): Promise<PassSeedResult> {
  const result: PassSeedResult = { passes: 0, skipped: [] }
  const farms = new Map<string, { id: number; timeZone: string }>()
  const { rows } = await repos.farms.list({ page: 1, pageSize: 200, order: 'asc' })
  for (const demo of demoFarms) {
    const row = rows.find((f) => f.name === demo.name)
    if (row) farms.set(demo.key, { id: row.id, timeZone: row.timeZone })
  }
  const fieldsOf = new Map<string, Awaited<ReturnType<Repositories['fields']['listByFarm']>>>()
  for (const [key, farm] of farms) fieldsOf.set(key, await repos.fields.listByFarm(farm.id))
  const demoFieldIds = demoPasses.flatMap((p) => fieldsOf.get(p.farm)?.filter((f) => f.name === p.field).map((f) => f.id) ?? [])
  for (const fieldId of new Set(demoFieldIds)) {
    const upcoming = await repos.passes.list({ fieldId, statuses: ['planned', 'confirmed'], from: new Date(nowMs), limit: 1 })
    if (upcoming.length) return result
  }

  for (const p of demoPasses) {
    const label = `${p.workType} on ${p.field}`
    const farm = farms.get(p.farm)
    const field = fieldsOf.get(p.farm)?.find((f) => f.name === p.field)
    const workType = await repos.workTypes.findByName(p.workType)
    const machine = p.machine ? await repos.machines.findByName(p.machine) : null
    if (!farm || !field || !workType || !workType.active || (p.machine && (!machine || !machine.active))) {
      result.skipped.push(`${label}: its farm, field, work type or machine is missing`)
      continue
    }
    const [hour, minute] = p.at.split(':').map(Number)
    const start = DateTime.fromMillis(nowMs, { zone: farm.timeZone }).startOf('day').plus({ days: p.day }).set({ hour, minute })
    const durationMin = p.durationMin ?? estimateDurationMin(field.areaHa, workType.rateHaPerH, machine?.rateHaPerH ?? null)
    const startAt = start.toJSDate()
    if (machine) {
      const busy = await repos.passes.machineBusy(machine.id, startAt, new Date(startAt.getTime() + durationMin * MINUTE_MS))
      if (busy.length) {
        result.skipped.push(`${label}: ${machine.name} is already booked then`)
        continue
      }
    }
    await repos.passes.insert({
      fieldId: field.id,
      workTypeId: workType.id,
      machineId: machine?.id ?? null,
      startAt,
      durationMin,
      status: p.status,
      atRisk: false,
      atRiskReason: null,
      suggestedStartAt: null,
      notes: p.notes,
      createdBy: null,
    })
    result.passes++
  }
  return result
}

/** Seeds the demo passes in one transaction. */
export async function seedPasses(db: Database, nowMs = Date.now()): Promise<PassSeedResult> {
  return createStore(db).transaction((repos) => seedPassesWith(repos, nowMs))
}
