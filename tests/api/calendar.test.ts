// Calendar feeds and the passes CSV. The .ics is parsed with ical.js, an iCalendar parser
// independent of the generator, and checked against RFC 5545: UID per event (3.8.4.7),
// DTSTART/DTEND in UTC (3.3.5, form 2 "date with UTC time"), STATUS TENTATIVE/CONFIRMED
// (3.8.1.11) and TRANSP OPAQUE/TRANSPARENT (3.8.2.7). The CSV follows RFC 4180 quoting.
import { createHash } from 'node:crypto'
import ICAL from 'ical.js'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HOUR_MS } from '../../shared/planning/index.ts'
import type { CreatedCalendarToken } from '../../shared/schemas/passes.ts'
import { clearListeners } from '../../server/events.ts'
import { hoursFromNow, makeField, makeMachine, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { Client, startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let field: { id: number; name: string; areaHa: number }
const h0 = hoursFromNow(2)
const iso = (h: number) => new Date(h0 + h * HOUR_MS).toISOString()
const ids: Record<'planned' | 'confirmed' | 'cancelled', number> = { planned: 0, confirmed: 0, cancelled: 0 }
let farmZone: string

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  field = await makeField(server, w, w.northFarmId, { areaHa: 20 })
  farmZone = (await server.repos.farms.findById(w.northFarmId))!.timeZone
  // Planting: Clear at hours 3-5 and 10-11; spraying Clear throughout but one Tight hour.
  await storeForecast(server, field.id, h0, {
    [w.workTypes.planting.id]: 'XXXCCCXXXXCCXXXX',
    [w.workTypes.spraying.id]: 'CCCCCCCCTCCCCCCC',
  })
  const m = await makeMachine(server)
  const book = async (start: number, durationMin: number, status: 'planned' | 'confirmed', notes = '') =>
    (await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.planting.id, machineId: m.id, start: iso(start), durationMin, status, notes })).body.id as number
  // Both in Clear hours, so neither is at risk.
  ids.planned = await book(3, 180, 'planned', 'Seed "Hybrid 4420", north end first')
  ids.confirmed = await book(10, 120, 'confirmed')
  ids.cancelled = await book(20, 60, 'planned')
  await w.crew.post(`/api/passes/${ids.cancelled}/cancel`)
})
afterAll(async () => {
  clearListeners()
  if (server) await removeMadeRecords(server)
  await server?.close()
})

async function createLink(client: Client, body: Record<string, unknown> = {}): Promise<CreatedCalendarToken> {
  const res = await client.post(`/api/farms/${w.northFarmId}/calendar-tokens`, body)
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as CreatedCalendarToken
}

/** Fetches a feed without a session and parses it with ical.js. */
async function feed(token: string) {
  const res = await new Client(server.app).get(`/api/calendar/${token}.ics`)
  if (res.status !== 200) return { status: res.status, events: [] as ICAL.Component[], cal: null }
  expect(res.headers['content-type']).toMatch(/^text\/calendar/)
  const cal = new ICAL.Component(ICAL.parse(res.text))
  return { status: res.status, events: cal.getAllSubcomponents('vevent'), cal }
}

describe('calendar feed', () => {
  it('publishes planned and confirmed passes in UTC, with the farm zone noted', async () => {
    const link = await createLink(w.admin, { label: 'Office wall calendar' })
    expect(link.token).toMatch(/^[A-Za-z0-9_-]{43}$/) // 32 random bytes, base64url
    expect(link.url).toBe(`${server.config.publicUrl}/api/calendar/${link.token}.ics`)
    const stored = await server.repos.calendarTokens.findById(link.id)
    expect(stored!.tokenHash).toBe(createHash('sha256').update(link.token).digest('hex'))
    expect(JSON.stringify(stored)).not.toContain(link.token)

    const { status, events, cal } = await feed(link.token)
    expect(status).toBe(200)
    expect(cal!.getFirstPropertyValue('version')).toBe('2.0')
    expect(cal!.getFirstPropertyValue('x-wr-timezone')).toBe(farmZone)
    const byUid = new Map(events.map((e) => [String(e.getFirstPropertyValue('uid')), e]))
    expect(byUid.has(`pass-${ids.cancelled}@skyfurrow`)).toBe(false)
    for (const [key, id] of [['planned', ids.planned], ['confirmed', ids.confirmed]] as const) {
      const ev = byUid.get(`pass-${id}@skyfurrow`)
      expect(ev, key).toBeDefined()
      const event = new ICAL.Event(ev!)
      const start = event.startDate
      expect(start.zone?.tzid).toBe('UTC')
      const pass = (await w.admin.get(`/api/passes/${id}`)).body
      expect(start.toJSDate().toISOString()).toBe(pass.start)
      expect(event.endDate.toJSDate().toISOString()).toBe(pass.end)
      expect(event.summary).toBe(`Planting · ${field.name}`)
      expect(ev!.getFirstPropertyValue('status')).toBe(key === 'confirmed' ? 'CONFIRMED' : 'TENTATIVE')
      expect(ev!.getFirstPropertyValue('transp')).toBe('OPAQUE')
      expect(event.description).toContain(`Farm time (${farmZone})`)
    }
    // Text with quotes and commas survives escaping (RFC 5545 3.3.11).
    expect(new ICAL.Event(byUid.get(`pass-${ids.planned}@skyfurrow`)!).description).toContain('Notes: Seed "Hybrid 4420", north end first')
    // Without includeWindows, no free events.
    expect(events.every((e) => e.getFirstPropertyValue('transp') === 'OPAQUE')).toBe(true)
  })

  it('adds the Clear windows per work type as free, transparent events on request', async () => {
    const link = await createLink(w.office, { includeWindows: true })
    const { events } = await feed(link.token)
    const free = events.filter((e) => e.getFirstPropertyValue('transp') === 'TRANSPARENT')
    const planting = free
      .filter((e) => e.getFirstPropertyValue('summary') === `Clear for Planting · ${field.name}`)
      .map((e) => [new ICAL.Event(e).startDate.toJSDate().toISOString(), new ICAL.Event(e).endDate.toJSDate().toISOString()])
    expect(planting).toEqual([
      [iso(3), iso(6)],
      [iso(10), iso(12)],
    ])
    const spraying = free
      .filter((e) => e.getFirstPropertyValue('summary') === `Clear for Spraying · ${field.name}`)
      .map((e) => new ICAL.Event(e).startDate.toJSDate().toISOString())
    expect(spraying).toEqual([iso(0), iso(9)])
    // Opaque passes are still there.
    expect(events.some((e) => e.getFirstPropertyValue('uid') === `pass-${ids.confirmed}@skyfurrow`)).toBe(true)
  })

  it('answers 404 once the link is revoked, and for unknown tokens', async () => {
    const link = await createLink(w.admin)
    expect((await feed(link.token)).status).toBe(200)
    expect((await w.admin.delete(`/api/calendar-tokens/${link.id}`)).status).toBe(204)
    expect((await feed(link.token)).status).toBe(404)
    const listed = (await w.admin.get(`/api/farms/${w.northFarmId}/calendar-tokens`)).body as Array<{ id: number; revokedAt: string | null }>
    expect(listed.find((t) => t.id === link.id)!.revokedAt).not.toBeNull()
    expect((await feed('A'.repeat(43))).status).toBe(404)
    expect((await feed('not-a-token')).status).toBe(404)
  })

  it('lets clients create and see their own links for their own farms only', async () => {
    const mine = await createLink(w.north, { label: 'My phone' })
    expect((await feed(mine.token)).status).toBe(200)
    const list = (await w.north.get(`/api/farms/${w.northFarmId}/calendar-tokens`)).body as Array<{ id: number; createdBy: number }>
    expect(list.map((t) => t.id)).toContain(mine.id)
    expect(new Set(list.map((t) => t.createdBy))).toEqual(new Set([mine.createdBy]))
    for (const t of list) expect(t).not.toHaveProperty('token')
    const adminLinks = (await w.admin.get(`/api/farms/${w.northFarmId}/calendar-tokens`)).body as Array<{ id: number }>
    expect(adminLinks.length).toBeGreaterThan(1)
    // Another farm's client and contractors get nothing.
    expect((await w.south.post(`/api/farms/${w.northFarmId}/calendar-tokens`, {})).status).toBe(404)
    expect((await w.south.get(`/api/farms/${w.northFarmId}/calendar-tokens`)).status).toBe(404)
    expect((await w.crew.post(`/api/farms/${w.northFarmId}/calendar-tokens`, {})).status).toBe(403)
    // A client cannot revoke a link someone else made; the office can revoke the client's.
    expect((await w.north.delete(`/api/calendar-tokens/${adminLinks[0].id}`)).status).toBe(404)
    expect((await w.office.delete(`/api/calendar-tokens/${mine.id}`)).status).toBe(204)
    expect((await feed(mine.token)).status).toBe(404)
    const bad = await w.admin.post(`/api/farms/${w.northFarmId}/calendar-tokens`, { includeWindows: 'yes' })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields).toHaveProperty('includeWindows')
  })
})

describe('passes CSV', () => {
  const csvUrl = () => `/api/passes.csv?farmId=${w.northFarmId}&from=${iso(0)}&to=${iso(24)}`

  /** RFC 4180 records (quoted fields with commas, quotes and line breaks). */
  function parseCsv(text: string): string[][] {
    const rows: string[][] = []
    let row: string[] = []
    let field = ''
    let quoted = false
    for (let i = 0; i < text.length; i++) {
      const c = text[i]
      if (quoted) {
        if (c === '"' && text[i + 1] === '"') {
          field += '"'
          i++
        } else if (c === '"') quoted = false
        else field += c
      } else if (c === '"') quoted = true
      else if (c === ',') {
        row.push(field)
        field = ''
      } else if (c === '\r' && text[i + 1] === '\n') {
        row.push(field)
        rows.push(row)
        row = []
        field = ''
        i++
      } else field += c
    }
    return rows
  }

  it('lists the farm’s passes in farm time with areas in the user’s units', async () => {
    // The demo admin prefers imperial units, client.south metric; set the office user to metric.
    await w.office.patch('/api/auth/me', { units: 'metric' })
    const imperial = await w.admin.get(csvUrl())
    expect(imperial.status).toBe(200)
    expect(imperial.headers['content-type']).toMatch(/^text\/csv/)
    expect(imperial.headers['content-disposition']).toMatch(/attachment; filename="?passes-[a-z0-9-]+-\d{4}-\d\d-\d\d\.csv"?$/)
    const rows = parseCsv(imperial.text.replace(/^\uFEFF/, ''))
    const header = rows[0]
    expect(header).toContain('Area (ac)')
    const idx = (name: string) => header.indexOf(name)
    const mine = rows.slice(1).filter((r) => r[idx('Field')] === field.name)
    expect(mine).toHaveLength(2) // planned + confirmed; the cancelled pass is left out
    const first = mine.find((r) => r[idx('Start (UTC)')] === iso(3))!
    // 20 ha = 49.42 ac (1 ac = 0.40468564224 ha, NIST Handbook 44 Appendix C)
    expect(first[idx('Area (ac)')]).toBe('49.42')
    expect(first[idx('Duration (h)')]).toBe('3.00')
    expect(first[idx('Time zone')]).toBe(farmZone)
    const local = new Intl.DateTimeFormat('sv-SE', { timeZone: farmZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date(iso(3)))
    expect(first[idx('Start (farm time)')].startsWith(local)).toBe(true)
    expect(first[idx('Notes')]).toBe('Seed "Hybrid 4420", north end first')

    const metric = parseCsv((await w.office.get(csvUrl())).text.replace(/^\uFEFF/, ''))
    expect(metric[0]).toContain('Area (ha)')
    const row = metric.slice(1).find((r) => r[metric[0].indexOf('Field')] === field.name && r[metric[0].indexOf('Start (UTC)')] === iso(3))!
    expect(row[metric[0].indexOf('Area (ha)')]).toBe('20.00')
  })

  it('is for the farm’s own clients only and names bad input', async () => {
    expect((await w.north.get(csvUrl())).status).toBe(200)
    expect((await w.south.get(csvUrl())).status).toBe(404)
    const bad = await w.admin.get(`/api/passes.csv?farmId=${w.northFarmId}&from=${iso(0)}`)
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields).toHaveProperty('to')
  })
})
