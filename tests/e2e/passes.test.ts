// The Passes page in a browser: a contractor books a pass with the estimated duration, is
// refused a second booking of the same machine (the refusal names the other pass), finds
// a window and books it, changes, finishes and cancels passes, exports the week as CSV;
// an admin makes a calendar link, reads the feed and revokes it; a farm client reads the
// passes of their farm with no buttons that change anything, on a phone too.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { DateTime } from 'luxon'
import type { Field } from '@shared/schemas/fields'
import type { Pass } from '@shared/schemas/passes'
import type { Machine, WorkType } from '@shared/schemas/planning'
import { estimateDurationMin } from '../../shared/planning/index.ts'
import { openDatabase } from '../../server/db/index.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { hoursFromNow, makeField, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { apiFromPage, demo, screenshot, signIn, signOut, startBrowser, startServer, waitForForecast, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

const zone = 'America/Chicago'

/** Chooses an option of an ant-design-vue select by its visible text. */
async function choose(page: Page, testId: string, text: string): Promise<void> {
  await page.getByTestId(testId).click()
  await page.locator('.ant-select-dropdown:not(.ant-select-dropdown-hidden) .ant-select-item-option', { hasText: text }).first().click()
}

/** Signs in on a clean slate: a test that failed half-way may have left a session behind. */
async function signInAs(email: string): Promise<Page> {
  await browser.context.clearCookies()
  await signIn(browser.page, server.baseUrl, email)
  return browser.page
}

/** A response body as text, fetched from inside the page with its session. */
async function textFromPage(page: Page, path: string): Promise<{ status: number; type: string; text: string }> {
  return page.evaluate(async (url) => {
    const response = await fetch(url, { credentials: 'same-origin' })
    return { status: response.status, type: response.headers.get('content-type') ?? '', text: await response.text() }
  }, path)
}

let farmId = 0
let fields: Field[] = []
let planting: WorkType
let tractor: Machine
/** passes this file made, cancelled again at the end so that reruns find the machine free */
const made: number[] = []
/** two days ahead at the farm, where the demo passes leave Tractor 14 free */
const day = DateTime.now().setZone(zone).plus({ days: 2 }).toISODate()!
const monday = DateTime.fromISO(day).startOf('week').toISODate()!

async function passesOf(page: Page): Promise<Pass[]> {
  return (await apiFromPage(page, `/api/passes?farmId=${farmId}`)).body as Pass[]
}

describe('Passes: the contractor schedules crews', () => {
  it('books a pass with the duration estimated from area and work rate, in farm time', async () => {
    const page = await signInAs(demo.contractor)
    const farms = (await apiFromPage(page, '/api/farms?pageSize=50')).body as { items: { id: number; name: string }[] }
    farmId = farms.items.find((f) => f.name === 'Hollis Creek Farms')!.id
    fields = (await apiFromPage(page, `/api/farms/${farmId}/fields`)).body as Field[]
    planting = ((await apiFromPage(page, '/api/work-types')).body as WorkType[]).find((t) => t.name === 'Planting')!
    tractor = ((await apiFromPage(page, '/api/machines')).body as Machine[]).find((m) => m.name.startsWith('Tractor 14'))!
    const eastEighty = fields.find((f) => f.name === 'East Eighty')!
    const before = new Set((await passesOf(page)).map((p) => p.id))

    await page.goto(`${server.baseUrl}/passes?farm=${farmId}&week=${monday}`)
    await page.getByTestId('passes-table').waitFor()
    await page.getByTestId('new-pass').click()
    await page.getByTestId('pass-form').waitFor()
    await choose(page, 'pass-field', 'East Eighty')
    await choose(page, 'pass-work-type', 'Planting')
    await choose(page, 'pass-machine', 'Tractor 14')
    await page.getByTestId('pass-date').fill(day)
    await page.getByTestId('pass-time').fill('13:00')

    // The estimate is the shared planning rule: area / rate, rounded up to 15 minutes.
    const expected = estimateDurationMin(eastEighty.areaHa, planting.rateHaPerH, tractor.rateHaPerH)
    expect(Number(await page.getByTestId('duration-hours').inputValue())).toBe(Math.floor(expected / 60))
    expect(Number(await page.getByTestId('duration-minutes').inputValue())).toBe(expected % 60)
    // Imperial user: the area and the rate are shown in acres.
    expect(await page.getByTestId('pass-estimate').textContent()).toMatch(/ac at 14\.8 ac\/h/)
    await page.getByTestId('pass-notes').fill('Booked by the browser test.')
    await screenshot(page, 'passes-form')
    await page.getByTestId('pass-save').click()
    await page.getByTestId('pass-form').waitFor({ state: 'detached' })

    const created = (await passesOf(page)).filter((p) => !before.has(p.id))
    expect(created).toHaveLength(1)
    made.push(created[0].id)
    expect(created[0]).toMatchObject({ fieldName: 'East Eighty', workTypeName: 'Planting', machineId: tractor.id, durationMin: expected, status: 'planned' })
    // 13:00 at the farm, stored in UTC.
    expect(DateTime.fromISO(created[0].start, { zone }).toFormat('yyyy-MM-dd HH:mm')).toBe(`${day} 13:00`)
    const row = page.locator(`[data-testid="passes-table"] tr[data-row-key="${created[0].id}"]`)
    await row.waitFor()
    expect(await row.textContent()).toMatch(/East Eighty.*Planting.*Tractor 14.*Planned/s)
    expect(await row.textContent()).toContain('13:00')
  }, 60_000)

  it('refuses to book the same machine twice and says which pass holds it', async () => {
    const { page } = browser
    await page.getByTestId('new-pass').click()
    await page.getByTestId('pass-form').waitFor()
    await choose(page, 'pass-field', 'Creek Bottom')
    await choose(page, 'pass-work-type', 'Strip-till')
    await choose(page, 'pass-machine', 'Tractor 14')
    await page.getByTestId('pass-date').fill(day)
    await page.getByTestId('pass-time').fill('14:00')
    await page.getByTestId('pass-save').click()
    const refusal = page.getByTestId('pass-conflict')
    await refusal.waitFor()
    const text = (await refusal.textContent())!
    expect(text).toContain('Tractor 14')
    expect(text).toContain(`pass ${made[0]}`)
    await screenshot(page, 'passes-double-booking')
    // Nothing was stored.
    expect((await passesOf(page)).filter((p) => p.fieldName === 'Creek Bottom' && p.machineId === tractor.id && p.start.startsWith(day))).toHaveLength(0)
    await page.locator('.ant-drawer').getByRole('button', { name: 'Close', exact: true }).last().click()
  })

  it('finds a window and books it from the Passes page', async () => {
    const { page } = browser
    // Windows come from the stored week, which the server may still be computing.
    await waitForForecast(page, server, farmId, fields.find((f) => f.name === 'Schoolhouse Forty')!.id)
    const before = new Set((await passesOf(page)).map((p) => p.id))
    await page.getByTestId('open-finder').click()
    await page.getByTestId('window-finder').waitFor()
    await choose(page, 'finder-field', 'Schoolhouse Forty')
    await choose(page, 'finder-work-type', 'Spraying')
    await page.getByTestId('finder-search').click()
    await page.getByTestId('finder-results').waitFor()
    await page.getByTestId('book-window-0').click()
    await page.getByTestId('window-finder').waitFor({ state: 'detached' })
    const created = (await passesOf(page)).filter((p) => !before.has(p.id))
    expect(created).toHaveLength(1)
    made.push(created[0].id)
    expect(created[0]).toMatchObject({ fieldName: 'Schoolhouse Forty', workTypeName: 'Spraying', machineId: null })
  }, 300_000)

  it('changes a pass, marks it done and cancels another', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/passes?farm=${farmId}&week=${monday}`)
    const row = page.locator(`[data-testid="passes-table"] tr[data-row-key="${made[0]}"]`)
    await row.waitFor()
    await row.getByRole('button', { name: 'Edit' }).click()
    await page.getByTestId('pass-form').waitFor()
    await page.getByTestId('pass-time').fill('15:30')
    await page.getByTestId('pass-status').getByText('Confirmed').click()
    await page.getByTestId('pass-save').click()
    await page.getByTestId('pass-form').waitFor({ state: 'detached' })
    const changed = (await passesOf(page)).find((p) => p.id === made[0])!
    expect(changed.status).toBe('confirmed')
    expect(DateTime.fromISO(changed.start, { zone }).toFormat('HH:mm')).toBe('15:30')

    await row.getByRole('button', { name: 'Done' }).click()
    await page.locator('.ant-popover:not(.ant-popover-hidden)').getByRole('button', { name: 'Done' }).click()
    await row.locator('.ant-tag', { hasText: 'Done' }).waitFor()
    expect(await row.getByRole('button', { name: 'Edit' }).count()).toBe(0)
    expect((await passesOf(page)).find((p) => p.id === made[0])!.status).toBe('done')
    await screenshot(page, 'passes-table')

    // Cancel the pass booked through the finder, in the week it falls in.
    const spraying = (await passesOf(page)).find((p) => p.id === made[1])!
    const itsMonday = DateTime.fromISO(spraying.start, { zone }).startOf('week').toISODate()
    await page.goto(`${server.baseUrl}/passes?farm=${farmId}&week=${itsMonday}`)
    const sprayRow = page.locator(`[data-testid="passes-table"] tr[data-row-key="${made[1]}"]`)
    await sprayRow.getByRole('button', { name: 'Cancel' }).click()
    await page.locator('.ant-popover:not(.ant-popover-hidden)').getByRole('button', { name: 'Cancel the pass' }).click()
    // Cancelled passes leave the default list (planned, confirmed, done).
    await sprayRow.waitFor({ state: 'detached' })
    expect((await passesOf(page)).find((p) => p.id === made[1])!.status).toBe('cancelled')
  }, 60_000)

  it('exports the week as CSV in farm time', async () => {
    const { page } = browser
    const href = (await page.getByTestId('passes-csv').getAttribute('href'))!
    const csv = await textFromPage(page, href)
    expect(csv.status).toBe(200)
    expect(csv.type).toContain('text/csv')
    const lines = csv.text.trim().split(/\r?\n/)
    expect(lines.length).toBeGreaterThanOrEqual(2)
    expect(lines.some((l) => l.includes('East Eighty') && l.includes('Planting') && l.includes(`${day} 15:30`))).toBe(true)
    await signOut(page)
  })
})

describe('Passes: calendar links and the client view', () => {
  it('lets the admin make a calendar link whose feed lists the passes, then revoke it', async () => {
    const page = await signInAs(demo.admin)
    await page.goto(`${server.baseUrl}/passes?farm=${farmId}&week=${monday}`)
    const section = page.getByTestId('calendar-links')
    await section.waitFor()
    const label = `Browser test phone ${Date.now()}`
    await section.getByRole('textbox', { name: 'Label of the new link' }).fill(label)
    await page.getByTestId('calendar-create').click()
    await page.getByTestId('calendar-created').waitFor().catch(async (error: unknown) => {
      await screenshot(page, 'passes-calendar-failed')
      throw error
    })
    const url = await page.getByTestId('calendar-url').inputValue()
    expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/api\/calendar\/[A-Za-z0-9_-]{20,}\.ics$/)
    const feed = await textFromPage(page, new URL(url).pathname)
    expect(feed.status).toBe(200)
    expect(feed.text).toContain('BEGIN:VCALENDAR')
    expect(feed.text).toContain('East Eighty')

    await section.locator('li', { hasText: label }).getByRole('button', { name: 'Revoke' }).click()
    await page.locator('.ant-popover:not(.ant-popover-hidden)').getByRole('button', { name: 'Revoke' }).click()
    await section.locator('li.revoked', { hasText: label }).waitFor()
    expect((await textFromPage(page, new URL(url).pathname)).status).toBe(404)
    await signOut(page)
  }, 60_000)

  it("shows the farm client their farm's passes read-only, also on a phone", async () => {
    const page = await signInAs(demo.clientNorth)
    await page.goto(`${server.baseUrl}/passes?week=${monday}`)
    await page.locator('[data-testid="passes-table"] tr', { hasText: 'East Eighty' }).first().waitFor()
    expect(await page.getByTestId('new-pass').count()).toBe(0)
    expect(await page.getByTestId('open-finder').count()).toBe(0)
    expect(await page.getByRole('button', { name: 'Edit' }).count()).toBe(0)
    expect(await page.getByRole('button', { name: 'Cancel' }).count()).toBe(0)
    // The client cannot book either.
    const refused = await page.evaluate(async (body) => {
      const response = await fetch('/api/passes', { method: 'POST', credentials: 'same-origin', headers: { 'Content-Type': 'application/json' }, body })
      return response.status
    }, JSON.stringify({ fieldId: fields[0].id, workTypeId: planting.id, start: new Date(Date.now() + 86_400_000).toISOString() }))
    expect(refused).toBe(403)

    await page.setViewportSize({ width: 390, height: 844 })
    try {
      await page.reload()
      const card = page.locator('.pass-cards li', { hasText: 'East Eighty' }).first()
      await card.waitFor()
      expect(await card.isVisible()).toBe(true)
      expect(await page.getByTestId('passes-table').isVisible()).toBe(false)
      await screenshot(page, 'passes-client-phone')
    } finally {
      await page.setViewportSize({ width: 1280, height: 800 })
      await signOut(page)
    }
  }, 60_000)

  it('lists a pass whose hours went Closed as at risk, with a suggested window it moves to in one click', async () => {
    // A field of the test's own with a stored week written as the forecast jobs write it:
    // Spraying Closed for two hours from two hours after the next full hour, Clear otherwise.
    const database = openDatabase(process.env.DATABASE_URL!, { connectionLimit: 2 })
    const world = { database, repos: createRepositories(database.db) }
    const rtk = (await world.repos.serviceLevels.findByName('RTK'))!
    const spraying = (await world.repos.workTypes.findByName('Spraying'))!
    const field = await makeField(world, { serviceLevelId: rtk.id }, farmId, { areaHa: 20, name: `At-risk field ${Date.now()}` })
    try {
      const start = hoursFromNow(0)
      await storeForecast(world, field.id, start, { [spraying.id]: 'CCXXCCCCCCCCCCCCCCCCCCCC' })

      const page = await signInAs(demo.contractor)
      const booked = await page.evaluate(async (body) => {
        const response = await fetch('/api/passes', { method: 'POST', credentials: 'same-origin', headers: { 'Content-Type': 'application/json' }, body })
        return (await response.json()) as Pass
      }, JSON.stringify({ fieldId: field.id, workTypeId: spraying.id, start: new Date(start + 3_600_000).toISOString(), durationMin: 180 }))
      expect(booked).toMatchObject({ atRisk: true })

      const itsMonday = DateTime.fromISO(booked.start, { zone }).startOf('week').toISODate()
      await page.goto(`${server.baseUrl}/passes?farm=${farmId}&week=${itsMonday}`)
      const item = page.getByTestId('at-risk-list').locator(`li[data-pass="${booked.id}"]`)
      await item.waitFor()
      expect(await item.textContent()).toMatch(/2 hours Closed for Spraying/)
      expect(await item.textContent()).toContain('Suggested instead')
      await screenshot(page, 'passes-at-risk')
      // The Outlook lists it too.
      await page.goto(`${server.baseUrl}/outlook?farm=${farmId}`)
      await page.getByTestId('at-risk-list').locator(`li[data-pass="${booked.id}"]`).waitFor()

      await page.goto(`${server.baseUrl}/passes?farm=${farmId}&week=${itsMonday}`)
      await page.getByTestId(`move-pass-${booked.id}`).click()
      await item.waitFor({ state: 'detached' })
      const moved = (await passesOf(page)).find((p) => p.id === booked.id)!
      expect(moved.atRisk).toBe(false)
      expect(moved.start).toBe(booked.suggestedStart)
      await signOut(page)
    } finally {
      await removeMadeRecords(world)
      await database.close()
    }
  }, 60_000)

  it('cleans up: the passes this file booked are cancelled and free their machine', async () => {
    const page = await signInAs(demo.office)
    for (const id of made) {
      const status = await page.evaluate(async (url) => (await fetch(url, { method: 'POST', credentials: 'same-origin' })).status, `/api/passes/${id}/cancel`)
      // The first pass is done and the second cancelled already; a done pass holds no machine.
      expect([200, 409]).toContain(status)
    }
    const left = (await apiFromPage(page, `/api/passes?farmId=${farmId}&status=planned,confirmed`)).body as Pass[]
    expect(left.filter((p) => made.includes(p.id))).toHaveLength(0)
    await signOut(page)
  })
})
