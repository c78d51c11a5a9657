// The Outlook in a browser: the contractor's journey (open the week of a field, pick a
// work type, find a window, book it, see it on the grid, open an hour's detail) and the
// farm client's (their farm's week and passes read-only, on a phone too; another farm's
// field is out of reach by address and by API).
//
// Forecasts: the server's start-up sweep queues every demo field whose stored week is
// missing or stale; the test asks for a recompute of its field as well and waits until
// the stored hours are there.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import type { FarmForecastResponse } from '@shared/schemas/forecast'
import type { Field } from '@shared/schemas/fields'
import type { Pass } from '@shared/schemas/passes'
import type { WorkType } from '@shared/schemas/planning'
import { apiFromPage, artifactsDir, demo, postFromPage, screenshot, signIn, signOut, startBrowser, startServer, waitForForecast, type RunningBrowser, type RunningServer } from './support'

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

/** Chooses an option of an ant-design-vue select by its visible text. */
async function choose(page: Page, testId: string, text: string): Promise<void> {
  await page.getByTestId(testId).click()
  await page.locator('.ant-select-dropdown:not(.ant-select-dropdown-hidden) .ant-select-item-option', { hasText: text }).first().click()
}

// Shared between the two journeys.
let northFarmId = 0
let homeQuarter: Field
let bookedPass: Pass
let otherFarmField: Field

describe('Outlook: the contractor plans a strip-till pass', () => {
  it('shows the week of a field by state for a chosen work type, matching the stored forecast', async () => {
    const { page } = browser
    await browser.context.clearCookies()
    await signIn(page, server.baseUrl, demo.contractor)

    const farms = (await apiFromPage(page, '/api/farms?pageSize=50')).body as { items: { id: number; name: string }[] }
    northFarmId = farms.items.find((f) => f.name === 'Hollis Creek Farms')!.id
    const southFarmId = farms.items.find((f) => f.name === 'Juniper Bend Ranch')!.id
    const fields = (await apiFromPage(page, `/api/farms/${northFarmId}/fields`)).body as Field[]
    homeQuarter = fields.find((f) => f.name === 'Home Quarter')!
    otherFarmField = ((await apiFromPage(page, `/api/farms/${southFarmId}/fields`)).body as Field[])[0]
    expect(homeQuarter).toBeTruthy()
    expect(otherFarmField).toBeTruthy()
    const forecast = await waitForForecast(page, server, northFarmId, homeQuarter.id)
    const workTypes = (await apiFromPage(page, '/api/work-types')).body as WorkType[]
    const stripTill = workTypes.find((t) => t.name === 'Strip-till')!

    await page.goto(`${server.baseUrl}/outlook`)
    await page.getByTestId('hour-grid').waitFor()
    await choose(page, 'farm-picker', 'Hollis Creek Farms')
    await choose(page, 'field-picker', 'Home Quarter')
    await choose(page, 'work-type-picker', 'Strip-till')
    await page.getByTestId('state-legend').getByText('Hour state for Strip-till').waitFor()
    // The safety caution is on the page, in small print.
    expect(await page.getByTestId('safety-caution').textContent()).toContain('Auto-steer must be supervised.')

    // Every stored hour in view carries the state the server stored for Strip-till.
    const cells = page.locator('[data-testid="hour-grid"] button.cell[data-state]')
    await cells.first().waitFor()
    const shown = await cells.evaluateAll((els) => els.map((e) => ({ hour: e.getAttribute('data-hour')!, state: e.getAttribute('data-state')! })))
    const stored = new Map(forecast.fields.find((f) => f.fieldId === homeQuarter.id)!.hours.map((h) => [new Date(h.time).toISOString(), h]))
    expect(shown.length).toBeGreaterThanOrEqual(24 * 6)
    for (const cell of shown) expect(cell.state).toBe(stored.get(cell.hour)!.workTypes[String(stripTill.id)].state)
    // Seven local days, each labelled, in the farm's own time zone.
    expect(await page.locator('[data-testid="hour-grid"] .grid-row[data-row]').count()).toBe(7)
    expect(await page.getByText("Hours in the farm's time (America/Chicago)").count()).toBe(1)

    // The tooltip names the hour's figures.
    await cells.nth(30).hover()
    const tip = page.getByTestId('hour-tip')
    await tip.waitFor()
    expect(await tip.textContent()).toMatch(/HDOP.*VDOP.*Horizontal 95 %/s)
    await screenshot(page, 'outlook-week-grid')
  }, 300_000)

  it('colours the cells by HDOP on the cividis ramp with its legend, the worst hour brightest', async () => {
    const { page } = browser
    await choose(page, 'show-picker', 'HDOP at the worst point')
    await page.getByTestId('cividis-legend').waitFor()
    const forecast = (await apiFromPage(page, `/api/farms/${northFarmId}/forecast`)).body as FarmForecastResponse
    const stored = new Map(forecast.fields.find((f) => f.fieldId === homeQuarter.id)!.hours.map((h) => [new Date(h.time).toISOString(), h]))
    const cells = await page
      .locator('[data-testid="hour-grid"] button.cell[data-hour]')
      .evaluateAll((els) => els.map((e) => ({ hour: e.getAttribute('data-hour')!, background: getComputedStyle(e).backgroundColor })))
    const withValue = cells.filter((c) => stored.get(c.hour)?.hdopMax != null)
    expect(withValue.length).toBeGreaterThan(100)
    const worst = withValue.reduce((a, b) => (stored.get(b.hour)!.hdopMax! > stored.get(a.hour)!.hdopMax! ? b : a))
    const best = withValue.reduce((a, b) => (stored.get(b.hour)!.hdopMax! < stored.get(a.hour)!.hdopMax! ? b : a))
    // The two ends of the published cividis table (Nuñez, Anderton & Renslow, PLOS ONE 2018):
    // entry 0 = (0.000000, 0.135112, 0.304751), entry 255 = (0.995737, 0.909344, 0.217772).
    expect(worst.background).toBe('rgb(254, 232, 56)')
    expect(best.background).toBe('rgb(0, 34, 78)')
    const legend = await page.getByTestId('cividis-legend').textContent()
    expect(legend).toContain('better')
    expect(legend).toContain(stored.get(worst.hour)!.hdopMax!.toFixed(2))
    await screenshot(page, 'outlook-hdop-legend')
    await choose(page, 'show-picker', 'Clear / Tight / Closed')
  })

  it('finds a window for the field, books it in one click and shows it on the grid', async () => {
    const { page } = browser
    const before = new Set(((await apiFromPage(page, `/api/passes?fieldId=${homeQuarter.id}`)).body as Pass[]).map((p) => p.id))
    await page.getByTestId('open-finder').click()
    const finder = page.getByTestId('window-finder')
    await finder.waitFor()
    // The duration is estimated from the field's area and the Strip-till rate.
    expect(await page.getByTestId('finder-estimate').textContent()).toMatch(/Estimate: .* ac at .* ac\/h = \d+ h/)
    // A strip-till pass of this field is longer than a December day: crews run through the night.
    await page.getByTestId('finder-night').click()
    await page.getByTestId('finder-search').click()
    await page.getByTestId('finder-results').waitFor()
    const first = finder.locator('[data-window="0"]')
    await first.waitFor()
    const windowText = (await first.textContent())!
    await screenshot(page, 'outlook-find-window')
    await page.getByTestId('book-window-0').click()
    await finder.waitFor({ state: 'detached' })

    // The pass is stored for that field and work type, and drawn over its hours.
    const passes = (await apiFromPage(page, `/api/passes?fieldId=${homeQuarter.id}`)).body as Pass[]
    const booked = passes.filter((p) => !before.has(p.id))
    expect(booked).toHaveLength(1)
    expect(booked[0]).toMatchObject({ workTypeName: 'Strip-till', status: 'planned', fieldName: 'Home Quarter' })
    bookedPass = booked[0]
    const band = page.locator(`[data-testid="hour-grid"] .pass-band[data-pass="${bookedPass.id}"]`).first()
    await band.waitFor()
    expect(await band.textContent()).toContain('Strip-till')
    const startCell = page.locator(`[data-testid="hour-grid"] button.cell[data-hour="${new Date(bookedPass.start).toISOString()}"]`)
    expect(await startCell.count()).toBe(1)
    // The finder's first window is the one booked.
    const startLabel = windowText.match(/(\w{3} \d+ \w{3} \d{2}:\d{2})/)![1]
    expect(await page.locator(`li[data-pass="${bookedPass.id}"]`).textContent()).toContain(startLabel)
    await screenshot(page, 'outlook-booked')
  }, 60_000)

  it("opens an hour's detail with its figures, the field's sample points on a map and the sky at the worst point", async () => {
    const { page } = browser
    await page.locator(`[data-testid="hour-grid"] button.cell[data-hour="${new Date(bookedPass.start).toISOString()}"]`).click()
    const drawer = page.locator('.ant-drawer-content')
    await drawer.getByTestId('hour-figures').waitFor({ timeout: 30_000 }).catch(async (error: unknown) => {
      await screenshot(page, 'outlook-hour-detail-failed')
      throw error
    })
    expect(await drawer.getByText('Strip-till', { exact: true }).count()).toBeGreaterThan(0)
    await drawer.getByTestId('precision-map').locator('canvas').first().waitFor()
    await drawer.getByTestId('sky-plot').waitFor()
    expect(await drawer.getByTestId('sky-plot').locator('svg[role="img"]').first().getAttribute('aria-label')).toMatch(/satellites above the horizon/)
    await page.waitForTimeout(800)
    await screenshot(page, 'outlook-hour-detail')
    // The drawer scrolls on its own: pictures of the map and of the sky view too.
    await drawer.getByTestId('precision-map').scrollIntoViewIfNeeded()
    await page.screenshot({ path: `${artifactsDir}/outlook-hour-detail-map.png` })
    await drawer.getByTestId('sky-plot').scrollIntoViewIfNeeded()
    await page.screenshot({ path: `${artifactsDir}/outlook-hour-detail-sky.png` })
    await drawer.getByRole('button', { name: 'Close' }).click()
    await page.getByTestId('field-charts').waitFor()
    await signOut(page)
  }, 60_000)
})

describe("Outlook: the farm client's view", () => {
  // A browser of the client's own, so that nothing of the contractor's session is left over.
  let client: RunningBrowser
  beforeAll(async () => {
    client = await startBrowser()
    await signIn(client.page, server.baseUrl, demo.clientNorth)
  })
  afterAll(async () => {
    await client?.close()
  })

  it("shows the client their farm's week and the booked pass, without planning buttons", async () => {
    const { page } = client
    await page.goto(`${server.baseUrl}/outlook?farm=${northFarmId}&field=${homeQuarter.id}`)
    await page.getByTestId('hour-grid').locator('button.cell[data-state]').first().waitFor()
    expect(await page.getByTestId('open-finder').count()).toBe(0)
    await page.locator(`[data-testid="hour-grid"] .pass-band[data-pass="${bookedPass.id}"]`).first().waitFor()
    // Only the client's own farm is offered.
    await page.getByTestId('farm-picker').click()
    const options = await page.locator('.ant-select-dropdown:not(.ant-select-dropdown-hidden) .ant-select-item-option').allTextContents()
    expect(options).toEqual(['Hollis Creek Farms'])
    await page.keyboard.press('Escape')

    await page.goto(`${server.baseUrl}/passes`)
    const row = page.locator('[data-testid="passes-table"] tr', { hasText: 'Strip-till' })
    await row.first().waitFor()
    expect(await page.getByTestId('new-pass').count()).toBe(0)
    expect(await page.getByRole('button', { name: 'Edit' }).count()).toBe(0)
  })

  it("cannot reach another farm's field by address or API", async () => {
    const { page } = client
    await page.goto(`${server.baseUrl}/outlook?field=${otherFarmField.id}`)
    await page.getByTestId('outlook-not-available').waitFor()
    expect(await page.locator('[data-testid="hour-grid"] button.cell').count()).toBe(0)
    await page.goto(`${server.baseUrl}/outlook?farm=${otherFarmField.farmId}`)
    await page.getByTestId('outlook-not-available').waitFor()
    for (const path of [
      `/api/fields/${otherFarmField.id}/forecast`,
      `/api/farms/${otherFarmField.farmId}/forecast`,
      `/api/fields/${otherFarmField.id}/hour-detail?hour=${encodeURIComponent(bookedPass.start)}`,
    ]) {
      expect([403, 404]).toContain((await apiFromPage(page, path)).status)
    }
  })

  it('reads well at phone width: the week fits the screen with each day in words', async () => {
    const { page } = client
    await page.setViewportSize({ width: 390, height: 844 })
    try {
      await page.goto(`${server.baseUrl}/outlook?farm=${northFarmId}&field=${homeQuarter.id}`)
      await page.getByTestId('hour-grid').locator('button.cell[data-state]').first().waitFor()
      // No sideways scrolling: the grid is as wide as the screen allows.
      const overflow = await page.locator('[data-testid="hour-grid"] .scroller').evaluate((el) => el.scrollWidth - el.clientWidth)
      expect(overflow).toBeLessThanOrEqual(1)
      const words = page.locator('[data-testid="hour-grid"] .runs')
      expect(await words.count()).toBe(7)
      expect(await words.nth(1).textContent()).toMatch(/^(Clear|Tight|Closed) \d{2}:\d{2}–/)
      await screenshot(page, 'outlook-client-phone')
    } finally {
      await page.setViewportSize({ width: 1280, height: 800 })
    }
  })

  it('cleans up: the pass booked by the contractor is cancelled again', async () => {
    const { page } = browser
    await browser.context.clearCookies()
    await signIn(page, server.baseUrl, demo.contractor)
    const result = await postFromPage(page, `/api/passes/${bookedPass.id}/cancel`)
    expect(result.status).toBe(200)
    expect((result.body as Pass).status).toBe('cancelled')
    await signOut(page)
  })
})
