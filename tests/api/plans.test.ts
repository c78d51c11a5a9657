// Weekly plan e-mails end to end on the test database and the real local fake SMTP server:
// preview, send (jobs run by a real JobRunner with the plan handlers), read the received
// message back with mailparser, parse its .ics attachment with ical.js (an independent
// RFC 5545 parser), SMTP down then up, a second click, opt-out, resend, the automatic send.
import { createServer } from 'node:net'
import ICAL from 'ical.js'
import { simpleParser, type ParsedMail } from 'mailparser'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HOUR_MS } from '../../shared/planning/index.ts'
import type { PlanPreview, PlanSendResult, PlanSendRow } from '../../shared/schemas/plans.ts'
import { createStore, type Store } from '../../server/db/repositories/index.ts'
import { clearListeners } from '../../server/events.ts'
import { EnginePool } from '../../server/jobs/enginePool.ts'
import { checkPlanSchedules, planJobHandlers } from '../../server/jobs/planJobs.ts'
import { JobRunner } from '../../server/jobs/runner.ts'
import { createLogger } from '../../server/logger.ts'
import { createMailer, type Mailer, type OutgoingMail } from '../../server/mail/transport.ts'
import { SAFETY_CAUTION } from '../../server/mail/planTemplate.ts'
import { mondayOf } from '../../server/services/plansCompose.ts'
import { until } from '../support/fileJobs.ts'
import { hoursFromNow, makeField, makeMachine, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { Client, createUserWithPassword, demo, startTestServer, unique, type TestServer } from '../support/server.ts'

let server: TestServer
let world: PlanningWorld
let store: Store
let runner: JobRunner
const pool = new EnginePool(1)
/** The SMTP the plan jobs use; a test points it at a closed port and back. */
let target: Mailer
const switchable: Mailer = { fake: true, send: (mail: OutgoingMail) => target.send(mail), close: () => {} }

let farmId: number
/** The farm's two client users: metric and imperial units. */
let metricClient: { id: number; email: string }
let imperialClient: { id: number; email: string }
let zone: string
let weekStart: string
let passId: number
let passStart: number
let fieldName: string
const extra = `${unique('dispatch')}@example.test`

async function closedPort(): Promise<number> {
  return new Promise((resolve) => {
    const probe = createServer()
    probe.listen(0, '127.0.0.1', () => {
      const port = (probe.address() as { port: number }).port
      probe.close(() => resolve(port))
    })
  })
}

/** Every message in the local mailbox to `to` with `subject`, parsed from its raw bytes. */
async function received(to: string, subject: string, containing?: string): Promise<ParsedMail[]> {
  const { rows } = await server.repos.mailbox.list({ page: 1, pageSize: 100, order: 'desc', q: to })
  const out: ParsedMail[] = []
  for (const r of rows.filter((m) => m.subject === subject && m.toAddresses.includes(to))) {
    out.push(await simpleParser((await server.repos.mailbox.findById(r.id))!.raw))
  }
  return containing === undefined ? out : out.filter((m) => (m.text ?? '').includes(containing))
}

const log = async (q = `farmId=${farmId}&weekStart=${weekStart}`) => (await world.office.get(`/api/plans/sends?${q}`)).body as PlanSendRow[]

beforeAll(async () => {
  server = await startTestServer()
  clearListeners()
  store = createStore(server.database.db)
  world = await planningWorld(server)
  target = server.mailer
  // A farm of this run's own, so the test can run again on the same database.
  zone = 'America/Chicago'
  farmId = await server.repos.farms.insert({ name: unique('Plan farm '), timeZone: zone, address: '', notes: '' })
  metricClient = await createUserWithPassword(server, { role: 'client', farmIds: [farmId] })
  imperialClient = await createUserWithPassword(server, { role: 'client', farmIds: [farmId] })
  await server.repos.users.update(imperialClient.id, { units: 'imperial' })
  const field = await makeField(server, world, farmId, { areaHa: 40, name: unique('Plan field ') })
  fieldName = field.name
  const machine = await makeMachine(server)
  passStart = hoursFromNow(30)
  passId = await server.repos.passes.insert({
    fieldId: field.id,
    workTypeId: world.workTypes.planting.id,
    machineId: machine.id,
    startAt: new Date(passStart),
    durationMin: 240,
    status: 'confirmed',
    atRisk: false,
    atRiskReason: null,
    suggestedStartAt: null,
    notes: 'North end first',
    createdBy: null,
  })
  // 12 Clear hours from the pass's start, then Closed.
  await storeForecast(server, field.id, passStart, { [world.workTypes.planting.id]: 'CCCCCCCCCCCCXXXX' })
  weekStart = mondayOf(passStart, zone)
  runner = new JobRunner({
    store,
    config: { ...server.config, jobConcurrency: 2 },
    logger: createLogger('error'),
    pool,
    handlers: planJobHandlers({ mailer: switchable }),
    retryBaseMs: 100,
    maxRetryDelayMs: 300,
    pollMs: 25,
  })
  await runner.start()
})

afterAll(async () => {
  await runner?.stop()
  await pool.close()
  if (server) await removeMadeRecords(server)
  await server?.close()
})

describe('weekly plans', () => {
  it('previews the plan as each recipient will read it, with the caution and the .ics events', async () => {
    const res = await world.office.post('/api/plans/preview', { farmId, weekStart, note: 'Seed arrives Tuesday.', units: 'imperial' })
    expect(res.status).toBe(200)
    const p = res.body as PlanPreview
    expect(p.subject).toContain(weekStart.slice(0, 4))
    expect(p.html).toContain('Seed arrives Tuesday.')
    expect(p.html).toContain(fieldName)
    expect(p.html).toContain('Planting')
    expect(p.html).toContain('98.8 ac') // 40 ha in acres (1 ac = 0.40468564224 ha)
    expect(p.text).toContain(SAFETY_CAUTION)
    expect(p.html).toContain('Auto-steer must be supervised.')
    expect(p.text).toMatch(/\/api\/plans\/opt-out\?token=/)
    expect(p.html).not.toContain('⟦')
    // The Clear hours of the field as one compact local range (12 hours from the pass's start).
    const startLocal = new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(passStart)
    expect(p.text).toContain(startLocal)
    expect(p.events.map((e) => e.uid)).toContain(`pass-${passId}@skyfurrow`)
    expect(p.recipients.map((r) => [r.email, r.units]).sort()).toEqual(
      [[metricClient.email, 'metric'], [imperialClient.email, 'imperial']].sort(),
    )
    const metric = (await world.office.post('/api/plans/preview', { farmId, weekStart, units: 'metric' })).body as PlanPreview
    expect(metric.html).toContain('40 ha')
    // As a given recipient: their units win, and the opt-out link is theirs.
    const asImperial = (await world.office.post('/api/plans/preview', { farmId, weekStart, units: 'metric', recipient: imperialClient.email })).body as PlanPreview
    expect(asImperial.text).toContain('(98.8 ac)')
    const token = new URL(/https?:\/\/\S+\/api\/plans\/opt-out\?token=\S+/.exec(asImperial.text)![0]).searchParams.get('token')!
    expect(Buffer.from(token.split('.')[1], 'base64url').toString()).toBe(imperialClient.email)
  })

  it('refuses a bad extra address, naming it', async () => {
    const res = await world.office.post('/api/plans/send', { farmId, weekStart, note: '', extraRecipients: [extra, 'not-an-address'] })
    expect(res.status).toBe(400)
    expect(res.body.error.fields['extraRecipients.1']).toContain('not-an-address')
    expect(res.body.error.message).toContain('not-an-address')
    const notMonday = await world.office.post('/api/plans/send', { farmId, weekStart: '2026-12-01', note: '' })
    expect(notMonday.status).toBe(400)
    expect(notMonday.body.error.fields.weekStart).toContain('Monday')
    expect(await log()).toEqual([])
  })

  it('sends HTML, text and the .ics to the farm clients and extra addresses, never to another farm', async () => {
    const since = new Date()
    const res = await world.office.post('/api/plans/send', { farmId, weekStart, note: 'Seed arrives Tuesday.', extraRecipients: [extra] })
    expect(res.status).toBe(202)
    const result = res.body as PlanSendResult
    expect(result.revision).toMatchObject({ revision: 1, created: true })
    expect(result.queued).toEqual(expect.arrayContaining([metricClient.email, extra]))
    expect(result.queued).toContain(imperialClient.email)
    expect(result.queued).not.toContain(demo.clientSouth)
    expect(result.queued).not.toContain(demo.clientNorth)
    await until(async () => (await log()).every((r) => r.status === 'sent') && (await log()).length === result.queued.length, 'the deliveries')

    const subject = (await log())[0] && (await server.repos.plans.findRevision(result.revision.id))!.subject
    const [mail, ...more] = await received(metricClient.email, subject)
    expect(more).toEqual([])
    expect(mail.to && !Array.isArray(mail.to) ? mail.to.value.map((a) => a.address) : []).toEqual([metricClient.email])
    expect(mail.text).toContain(SAFETY_CAUTION)
    expect(mail.text).toContain('Seed arrives Tuesday.')
    expect(typeof mail.html === 'string' && mail.html).toContain(fieldName)
    // The client's units are metric in the demo scenario.
    expect(mail.text).toContain('(40 ha)')
    const row = (await log()).find((r) => r.recipient === metricClient.email)!
    expect(row).toMatchObject({ status: 'sent', attempts: 1, sentByName: expect.any(String), automatic: false, revision: 1, resend: 0 })
    expect(mail.messageId).toBe(row.messageId)

    // The attachment, parsed with ical.js. RFC 5545: METHOD (3.7.2) PUBLISH, one VEVENT
    // (3.6.1) per pass with its UID (3.8.4.7), DTSTART/DTEND (3.8.2.4, 3.8.2.2) in UTC.
    expect(mail.attachments).toHaveLength(1)
    const att = mail.attachments[0]
    expect(att.contentType).toBe('text/calendar')
    expect(att.filename).toMatch(new RegExp(`-${weekStart}\\.ics$`))
    const cal = new ICAL.Component(ICAL.parse(att.content.toString('utf8')))
    expect(cal.name).toBe('vcalendar')
    expect(cal.getFirstPropertyValue('method')).toBe('PUBLISH')
    expect(cal.getFirstPropertyValue('version')).toBe('2.0')
    const events = cal.getAllSubcomponents('vevent').map((v) => new ICAL.Event(v))
    const ours = events.find((e) => e.uid === `pass-${passId}@skyfurrow`)
    expect(ours).toBeDefined()
    expect(ours!.startDate.toJSDate().getTime()).toBe(passStart)
    expect(ours!.endDate.toJSDate().getTime()).toBe(passStart + 4 * HOUR_MS)
    expect(ours!.summary).toBe(`Planting · ${fieldName}`)
    expect(ours!.description).toContain('Notes: North end first')
    for (const e of events) {
      expect(e.startDate.toJSDate().getTime()).toBeLessThan(Date.parse(`${weekStart}T00:00:00Z`) + 8 * 24 * HOUR_MS)
    }

    expect(await received(extra, subject)).toHaveLength(1)
    // Each recipient's own units: the imperial client reads acres.
    const [imperialMail] = await received(imperialClient.email, subject)
    expect(imperialMail.text).toContain('(98.8 ac)')
    // Clients of other farms got nothing of it.
    for (const other of [demo.clientSouth, demo.clientNorth]) {
      const { rows } = await server.repos.mailbox.list({ page: 1, pageSize: 50, order: 'desc', q: other })
      expect(rows.filter((m) => m.receivedAt >= since && m.subject === subject)).toEqual([])
    }
  })

  it('a second click on Send for the same revision sends nothing new and says so', async () => {
    const before = await log()
    const res = await world.office.post('/api/plans/send', { farmId, weekStart, note: 'Seed arrives Tuesday.', extraRecipients: [extra] })
    expect(res.status).toBe(200)
    const result = res.body as PlanSendResult
    expect(result.revision).toMatchObject({ revision: 1, created: false })
    expect(result.queued).toEqual([])
    expect(result.alreadySent).toEqual(expect.arrayContaining([metricClient.email, extra]))
    expect(result.message).toContain('already sent')
    await runner.idle()
    expect(await log()).toEqual(before)
    const subject = (await server.repos.plans.findRevision(result.revision.id))!.subject
    expect(await received(metricClient.email, subject)).toHaveLength(1)
  })

  it('SMTP down then up: the job retries with backoff and the message arrives exactly once', async () => {
    const late = `${unique('late')}@example.test`
    target = createMailer({ from: server.config.mailFrom, smtpUrl: `smtp://127.0.0.1:${await closedPort()}` })
    const res = await world.office.post('/api/plans/send', { farmId, weekStart, note: 'Seed arrives Tuesday.', extraRecipients: [late] })
    expect(res.status).toBe(202)
    expect((res.body as PlanSendResult).queued).toEqual([late])
    const failing = await until(async () => (await log()).find((r) => r.recipient === late && r.error), 'a failed attempt')
    expect(failing.status).toBe('queued')
    expect(failing.error).toMatch(/ECONNREFUSED|connect/i)
    target = server.mailer
    const sent = await until(async () => (await log()).find((r) => r.recipient === late && r.status === 'sent'), 'the delivery')
    expect(sent.attempts).toBeGreaterThanOrEqual(2)
    expect(sent.error).toBeNull()
    await runner.idle()
    const subject = (await server.repos.plans.findRevision(sent.revisionId))!.subject
    expect(await received(late, subject)).toHaveLength(1)
  })

  it('a changed note makes a new revision; the log opens a revision as it was sent', async () => {
    // The preview already shows the subject the new revision will have.
    const preview = (await world.office.post('/api/plans/preview', { farmId, weekStart, note: 'Seed arrives Wednesday instead.', units: 'metric' })).body as PlanPreview
    expect(preview.subject).toMatch(/\(revised, version 2\)$/)
    const res = await world.office.post('/api/plans/send', { farmId, weekStart, note: 'Seed arrives Wednesday instead.', extraRecipients: [] })
    expect(res.status).toBe(202)
    const result = res.body as PlanSendResult
    expect(result.revision).toMatchObject({ revision: 2, created: true })
    expect(result.queued).toContain(metricClient.email)
    expect(result.queued).not.toContain(extra)
    await until(async () => (await log()).filter((r) => r.revision === 2).every((r) => r.status === 'sent'), 'revision 2')
    const detail = (await world.office.get(`/api/plans/revisions/${result.revision.id}?recipient=${encodeURIComponent(metricClient.email)}`)).body
    // A client can tell the new plan from the one it replaces.
    expect(detail.subject).toBe(preview.subject)
    const [mail, ...more] = await received(metricClient.email, detail.subject, 'Seed arrives Wednesday instead.')
    expect(more).toEqual([])
    expect(mail.subject).toMatch(/^Weekly plan for .+ \(revised, version 2\)$/)
    expect(detail.note).toBe('Seed arrives Wednesday instead.')
    expect(detail.text.trim()).toBe(mail.text!.trim())
    expect(detail.ics).toContain(`UID:pass-${passId}@skyfurrow`)
  })

  it('resends a revision only on purpose, with a new idempotency key', async () => {
    const rev1 = (await log()).find((r) => r.revision === 1 && r.recipient === extra)!
    const unconfirmed = await world.office.post(`/api/plans/revisions/${rev1.revisionId}/resend`, { recipients: [extra] })
    expect(unconfirmed.status).toBe(400)
    expect(unconfirmed.body.error.fields.confirm).toBeDefined()
    const res = await world.office.post(`/api/plans/revisions/${rev1.revisionId}/resend`, { confirm: true, recipients: [extra] })
    expect(res.status).toBe(202)
    expect((res.body as PlanSendResult).queued).toEqual([extra])
    await until(async () => (await log()).find((r) => r.recipient === extra && r.resend === 1 && r.status === 'sent'), 'the resend')
    const subject = (await server.repos.plans.findRevision(rev1.revisionId))!.subject
    const mails = await received(extra, subject)
    expect(mails).toHaveLength(2)
    expect(mails[0].messageId).not.toBe(mails[1].messageId)
    const stranger = await world.office.post(`/api/plans/revisions/${rev1.revisionId}/resend`, { confirm: true, recipients: ['nobody@example.test'] })
    expect(stranger.status).toBe(400)
    expect(stranger.body.error.message).toContain('nobody@example.test')
  })

  it('honours an opt-out from the signed link; the office sees it and can take the address back', async () => {
    const rev = (await log()).find((r) => r.recipient === metricClient.email && r.revision === 2)!
    const subject = (await server.repos.plans.findRevision(rev.revisionId))!.subject
    const [mail] = await received(metricClient.email, subject, 'Seed arrives Wednesday instead.')
    const link = new URL(/https?:\/\/\S+\/api\/plans\/opt-out\?token=\S+/.exec(mail.text!)![0])
    const token = link.searchParams.get('token')!
    const anonymous = new Client(server.app)
    // Tampered: another farm's id with the same signature.
    const forged = token.replace(/^\d+\./, `${world.southFarmId}.`)
    expect((await anonymous.post('/api/plans/opt-out', { token: forged })).status).toBe(400)
    const page = await anonymous.get(`/api/plans/opt-out?token=${encodeURIComponent(token)}`)
    expect(page.status).toBe(200)
    expect(page.text).toContain('Stop the weekly plans')
    expect(await server.repos.plans.isOptedOut(farmId, metricClient.email)).toBe(false) // GET changes nothing
    const done = await anonymous.post('/api/plans/opt-out', { token })
    expect(done.status).toBe(200)
    expect(done.body).toMatchObject({ farmId, email: metricClient.email, optedOut: true })
    const list = (await world.office.get(`/api/farms/${farmId}/plan-opt-outs`)).body as Array<{ email: string }>
    expect(list.map((o) => o.email)).toEqual([metricClient.email])

    const res = await world.office.post('/api/plans/send', { farmId, weekStart, note: 'Third version.', extraRecipients: [] })
    const result = res.body as PlanSendResult
    expect(result.optedOut).toEqual([metricClient.email])
    expect(result.queued).not.toContain(metricClient.email)
    await runner.idle()
    const third = (await server.repos.plans.findRevision(result.revision.id))!.subject
    expect(await received(metricClient.email, third, 'Third version.')).toEqual([])
    expect(await received(imperialClient.email, third, 'Third version.')).toHaveLength(1)

    expect((await world.office.delete(`/api/farms/${farmId}/plan-opt-outs/${encodeURIComponent(metricClient.email)}`)).status).toBe(204)
    expect((await world.office.get(`/api/farms/${farmId}/plan-opt-outs`)).body).toEqual([])
  })

  it('a missed automatic run is sent once when the server is back, not once per missed week', async () => {
    const farm = await server.repos.farms.insert({ name: unique('Plan schedule farm '), timeZone: 'America/Chicago', address: '', notes: '' })
    const client = await createUserWithPassword(server, { role: 'client', farmIds: [farm] })
    await server.repos.plans.upsertSchedule(farm, { enabled: true, weekday: 1, localTime: '00:00' })
    // Last sent three weeks ago: the server was down for the runs in between.
    const now = Date.now()
    const current = mondayOf(now, 'America/Chicago')
    const threeWeeksAgo = mondayOf(now - 21 * 24 * HOUR_MS, 'America/Chicago')
    await server.repos.plans.setLastSentWeek(farm, threeWeeksAgo)
    expect(await checkPlanSchedules(store, now)).toBeGreaterThanOrEqual(1)
    expect(await checkPlanSchedules(store, now)).toBe(0) // the job of this week exists already
    await until(async () => (await server.repos.plans.schedule(farm))?.lastSentWeek === current, 'the automatic send')
    const rows = await until(async () => {
      const r = await log(`farmId=${farm}`)
      return r.length && r.every((x) => x.status === 'sent') ? r : null
    }, 'the automatic delivery')
    expect(rows).toHaveLength(1)
    expect(rows[0]).toMatchObject({ recipient: client.email, automatic: true, weekStart: current, sentBy: null })
    expect(await checkPlanSchedules(store, now + HOUR_MS)).toBe(0)
    await runner.idle()
    expect(await log(`farmId=${farm}`)).toHaveLength(1)
    const subject = (await server.repos.plans.findRevision(rows[0].revisionId))!.subject
    expect(await received(client.email, subject)).toHaveLength(1)
  })

  it('keeps the automatic send settings per farm in its zone', async () => {
    const bad = await world.office.call('put', `/api/farms/${farmId}/plan-schedule`, { enabled: true, weekday: 8, localTime: '7:00' })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['localTime', 'weekday'])
    const ok = await world.office.call('put', `/api/farms/${farmId}/plan-schedule`, { enabled: true, weekday: 1, localTime: '06:30' })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ enabled: true, weekday: 1, localTime: '06:30', timeZone: zone })
    const next = new Date(ok.body.nextRunAt as string).getTime()
    expect(next).toBeGreaterThan(Date.now() - 60_000)
    expect(new Intl.DateTimeFormat('en-GB', { timeZone: zone, weekday: 'short', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(next)).toBe('Mon 06:30')
    await world.office.call('put', `/api/farms/${farmId}/plan-schedule`, { enabled: false, weekday: 1, localTime: '06:30' })
  })
})
