// In the cab, in a browser the size of a phone: a crew member opens the cab view once with
// signal (the service worker installs, the week is kept on the device), loses the signal,
// opens the page again and still reads the week, marks a pass done, and the change reaches
// the server when the signal returns; the office then sees it done with who and when.
// Asking for the device position again works after the browser refused it once.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Pass } from '@shared/schemas/passes'
import { openDatabase } from '../../server/db/index.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { hoursFromNow, makeField, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { demo, postFromPage, screenshot, signIn, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser
const handle = openDatabase(process.env.DATABASE_URL ?? '', { connectionLimit: 2 })
const repos = createRepositories(handle.db)
let machineId = 0

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
  // The field takes its passes with it; then the machine can go.
  await removeMadeRecords({ repos, database: handle })
  if (machineId) await repos.machines.delete(machineId)
  await handle.close()
})

describe('the cab view without signal', () => {
  it('keeps the week on the device and sends a "done" made offline once the signal returns', async () => {
    const crewUser = (await repos.users.findByEmail(demo.contractor))!
    const farm = (await repos.farms.list({ page: 1, pageSize: 50, order: 'asc' })).rows.find((f) => f.name === 'Hollis Creek Farms')!
    const rtk = (await repos.serviceLevels.findByName('RTK'))!
    const planting = (await repos.workTypes.findByName('Planting'))!
    // A machine of the test's own that the demo crew member runs, and a field with a Clear week.
    machineId = await repos.machines.insert({ name: `Cab test tractor ${Date.now().toString(36)}`, crew: crewUser.name, antennaHeightM: 3.4, rateHaPerH: null, active: true, notes: '', operatorUserId: crewUser.id })
    const field = await makeField({ repos }, { serviceLevelId: rtk.id }, farm.id, { areaHa: 8, name: `Cab test field ${Date.now().toString(36)}` })
    await storeForecast({ database: handle }, field.id, hoursFromNow(-1), { [planting.id]: 'C'.repeat(6) + 'X'.repeat(4) + 'C'.repeat(60) })

    const { page, context } = browser
    await page.setViewportSize({ width: 390, height: 844 })
    await signIn(page, server.baseUrl, demo.contractor)
    const booked = await postFromPage(page, '/api/passes', {
      fieldId: field.id,
      workTypeId: planting.id,
      machineId,
      start: new Date(hoursFromNow(1)).toISOString(),
      durationMin: 120,
    })
    expect(booked.status).toBe(201)
    const pass = booked.body as Pass

    // First visit with signal: the service worker takes control and the week is stored.
    await page.goto(`${server.baseUrl}/cab`)
    await page.waitForFunction(async () => (await navigator.serviceWorker.ready).active !== null)
    if (!(await page.evaluate(() => navigator.serviceWorker.controller !== null))) await page.reload()
    await page.waitForFunction(() => navigator.serviceWorker.controller !== null)
    // Once more under the service worker's control, so it has seen the session check too.
    await page.reload()
    const card = page.locator(`[data-testid="cab-pass"][data-pass="${pass.id}"]`)
    await card.waitFor()
    await page.getByTestId('cab-as-of').waitFor()
    expect(await card.getByTestId('cab-now').textContent()).toContain('Clear')
    expect(await card.getByTestId('cab-window').textContent()).toContain('The window holds for the whole pass')
    await screenshot(page, 'cab-online-phone')

    // The browser refuses the position (no permission given): a short note, and the button
    // comes back; once allowed, the same button shows the position.
    const locate = card.getByTestId('cab-locate')
    await locate.click()
    await card.getByText('Position not shared', { exact: false }).waitFor()
    await locate.waitFor()
    await context.grantPermissions(['geolocation'], { origin: server.baseUrl })
    await context.setGeolocation({ latitude: 42.05, longitude: -93.62, accuracy: 4 })
    await locate.click()
    await card.getByText('Your position, within about 4 m').waitFor()
    expect(await locate.count()).toBe(0)

    // No signal: the page opens again from the device and still shows the week.
    await context.setOffline(true)
    await page.reload()
    await card.waitFor()
    await page.getByText('No signal', { exact: true }).waitFor()
    expect(await page.getByTestId('cab-as-of').textContent()).toMatch(/data as of/)
    expect(await page.getByTestId('safety-caution').textContent()).toContain('Auto-steer must be supervised')

    await card.getByTestId('cab-note').fill('Finished before the wind got up.')
    await card.getByTestId('cab-done').click()
    await page.getByTestId('cab-waiting').waitFor()
    expect(await card.getAttribute('data-status')).toBe('done')
    await screenshot(page, 'cab-offline-phone')
    // Nothing reached the server yet.
    expect((await repos.passes.findById(pass.id))!.status).toBe('planned')

    // Signal back: the outbox is sent, the server has it, the page says everything is sent.
    await context.setOffline(false)
    const deadline = Date.now() + 60_000
    while ((await repos.passes.findById(pass.id))!.status !== 'done') {
      if (Date.now() > deadline) throw new Error(`the queued "done" did not reach the server:\n${server.log().slice(-1500)}`)
      await page.waitForTimeout(250)
    }
    const stored = (await repos.passes.findById(pass.id))!
    expect(stored.statusChangedBy).toBe(crewUser.id)
    expect(stored.notes).toContain('Finished before the wind got up.')
    await page.getByText('everything sent').waitFor()
    await page.getByText('Online', { exact: true }).waitFor()
  }, 180_000)
})
