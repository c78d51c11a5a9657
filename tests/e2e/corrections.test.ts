// Correction quality in a browser: a field moved out of its RTK base's radio range shows the
// warning on the Fields page and the Outlook, and once recomputed its Planting hours are
// Closed for that reason, with the storm hours of the Kp forecast marked in the grid; the admin forms carry the error model with a baseline (Service
// levels) and what a geomagnetic storm does to a work type (Work types).
//
// The test makes its own field, service level and work type and removes them again.
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import type { CorrectionSources, FieldCorrection, SpaceWeatherStatus } from '@shared/schemas/corrections'
import type { Field } from '@shared/schemas/fields'
import type { ServiceLevel, WorkType } from '@shared/schemas/planning'
import { apiFromPage, artifactsDir, demo, postFromPage, screenshot, signIn, startBrowser, startServer, waitForForecast, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser
/** What the test made, removed in afterAll even when a check failed. */
const made: string[] = []

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
})

afterAll(async () => {
  if (browser) {
    for (const path of made.reverse()) await sendFromPage(browser.page, 'DELETE', path).catch(() => undefined)
    await browser.close()
  }
  await server?.stop()
})

/** PATCH / PUT / DELETE from inside the page (session cookie, same origin), JSON in and out. */
async function sendFromPage(page: Page, method: string, path: string, body?: unknown): Promise<{ status: number; body: unknown }> {
  return page.evaluate(
    async ([verb, url, payload]) => {
      const response = await fetch(url as string, {
        method: verb as string,
        credentials: 'same-origin',
        headers: { 'Content-Type': 'application/json', Accept: 'application/json' },
        body: payload === undefined ? undefined : JSON.stringify(payload),
      })
      let json: unknown = null
      try {
        json = await response.json()
      } catch {
        json = null
      }
      return { status: response.status, body: json }
    },
    [method, path, body] as const,
  )
}

const M_PER_DEG_LAT = 111_320
/** A square field `sideM` wide whose centre lies `eastM` east of a point (flat-earth, fine over a few km). */
function squareEastOf(latDeg: number, lonDeg: number, eastM: number, sideM: number) {
  const mPerDegLon = M_PER_DEG_LAT * Math.cos((latDeg * Math.PI) / 180)
  const lon = (e: number) => lonDeg + e / mPerDegLon
  const lat = (n: number) => latDeg + n / M_PER_DEG_LAT
  const h = sideM / 2
  const ring = [
    [lon(eastM - h), lat(-h)],
    [lon(eastM + h), lat(-h)],
    [lon(eastM + h), lat(h)],
    [lon(eastM - h), lat(h)],
    [lon(eastM - h), lat(-h)],
  ]
  return { type: 'Polygon' as const, coordinates: [ring] }
}

const stamp = Date.now().toString(36)

describe('a field out of its base station\'s radio range', () => {
  it('warns on the Fields page and the Outlook, and its Planting hours are Closed after the recompute', async () => {
    const { page } = browser
    await browser.context.clearCookies()
    await signIn(page, server.baseUrl, demo.contractor)

    const farms = (await apiFromPage(page, '/api/farms?pageSize=50')).body as { items: { id: number; name: string }[] }
    const farmId = farms.items.find((f) => f.name === 'Meadowlark Bottoms')!.id
    const sources = (await apiFromPage(page, '/api/corrections')).body as CorrectionSources
    const base = sources.bases.find((b) => b.name === 'Meadowlark grain-leg base')!
    const levels = (await apiFromPage(page, '/api/service-levels')).body as ServiceLevel[]
    const rtk = levels.find((l) => l.name === 'RTK')!
    const planting = ((await apiFromPage(page, '/api/work-types')).body as WorkType[]).find((t) => t.name === 'Planting')!
    expect(base.radioRangeKm).toBe(4.7)
    expect(rtk.needsBase).toBe(true)

    // A 200 m square 1 km east of the base: well inside its 4.7 km of radio.
    const name = `Range check ${stamp}`
    const created = await postFromPage(page, `/api/farms/${farmId}/fields`, {
      name,
      serviceLevelId: rtk.id,
      boundary: squareEastOf(base.latDeg, base.lonDeg, 1000, 200),
    })
    expect(created.status).toBe(201)
    const field = created.body as Field
    made.push(`/api/fields/${field.id}`)
    const chosen = await sendFromPage(page, 'PUT', `/api/fields/${field.id}/correction`, { kind: 'base', id: base.id })
    expect(chosen.status).toBe(200)
    expect((chosen.body as FieldCorrection).warnings).toEqual([])
    // Its first week is stored before it moves, so the week waited for below is the moved one.
    await waitForForecast(page, server, farmId, field.id)

    // Moved 12 km east of the base: past the radio range (the RTK level's 30 km limit still holds).
    const moved = await sendFromPage(page, 'PATCH', `/api/fields/${field.id}`, { boundary: squareEastOf(base.latDeg, base.lonDeg, 12_000, 200) })
    expect(moved.status).toBe(200)
    const after = (await apiFromPage(page, `/api/fields/${field.id}/correction`)).body as FieldCorrection
    expect(after.problem).toBe('out-of-range')
    expect(after.warnings.join(' ')).toContain(base.name)
    // A recompute asked for after the move: the week waited for comes from the moved field.
    expect((await postFromPage(page, `/api/fields/${field.id}/recompute`)).status).toBe(202)

    // The Fields page: the field's panel shows the warning.
    await page.goto(`${server.baseUrl}/fields?farm=${farmId}`)
    await page.getByLabel('Search fields').first().fill(name)
    await page.getByTestId('fields-table').getByText(name).click()
    const fieldWarning = page.getByTestId('field-correction').getByTestId('correction-warning')
    await fieldWarning.waitFor()
    expect(await fieldWarning.getAttribute('data-problem')).toBe('out-of-range')
    expect(await fieldWarning.textContent()).toContain('RTK cannot run on this field')
    // The panel sits below the field editor in the side column, which scrolls on its own.
    await page.getByTestId('field-correction').screenshot({ path: join(artifactsDir, 'corrections-field-out-of-range.png') })

    // The sky check in the field (the map is centred on it): its error budget names the
    // baseline to the base and says why Planting is Closed.
    await page.getByTestId('tool-sky-check').click()
    await expect.poll(() => page.getByTestId('tool-help').textContent()).toMatch(/Click a point inside a field/)
    const box = (await page.getByTestId('farm-map').boundingBox())!
    await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2)
    const budget = page.getByTestId('sky-check').getByTestId('error-budget')
    await budget.waitFor()
    expect(await budget.getByTestId('budget-baseline').textContent()).toContain(`${after.link!.baselineKm.toFixed(1)} km to ${base.name}`)
    await budget.getByText('Planting is Closed: the field is outside the radio range').waitFor()
    // The space-weather line follows the feed's state: a stale or missing feed says storms are unknown.
    const feedState = ((await apiFromPage(page, '/api/space-weather')).body as SpaceWeatherStatus).state
    const weatherLine = budget.getByTestId('budget-space-weather')
    expect(await weatherLine.getAttribute('data-state')).toMatch(feedState === 'current' ? /^(quiet|storm|uncovered)$/ : new RegExp(`^${feedState}$`))
    expect(await weatherLine.textContent()).toMatch(
      feedState === 'stale'
        ? /Space weather: space-weather forecast out of date .*storms unknown/
        : feedState === 'none'
          ? /Space weather: no space-weather forecast has been read, storms unknown/
          : /Space weather: (Kp|geomagnetic storm|no Kp forecast)/,
    )
    await page.getByTestId('sky-check').screenshot({ path: join(artifactsDir, 'corrections-sky-check-budget.png') })

    // The stored week after the recompute: every Planting hour Closed, out of range.
    const farm = await waitForForecast(page, server, farmId, field.id)
    const hours = farm.fields.find((f) => f.fieldId === field.id)!.hours
    expect(hours.length).toBeGreaterThanOrEqual(24 * 6)
    for (const h of hours) {
      expect(h.workTypes[String(planting.id)].state).toBe('closed')
      expect(h.workTypes[String(planting.id)].reason).toBe('out-of-range')
    }

    // The Outlook: the same warning above the week, and the grid shows those hours Closed.
    await page.goto(`${server.baseUrl}/outlook?farm=${farmId}&field=${field.id}&wt=${planting.id}`)
    const outlookWarning = page.getByTestId('correction-warning')
    await outlookWarning.waitFor()
    expect(await outlookWarning.getAttribute('data-problem')).toBe('out-of-range')
    const cells = page.locator('[data-testid="hour-grid"] button.cell[data-state]')
    await cells.first().waitFor()
    const states = await cells.evaluateAll((els) => els.map((e) => e.getAttribute('data-state')))
    expect(states.length).toBeGreaterThanOrEqual(24 * 6)
    expect(new Set(states)).toEqual(new Set(['closed']))
    // Storm marks: exactly the cells of the hours whose stored flag is G3 or worse carry one, with
    // their G level; with the feed current, the demo feed's storm day puts some in the week.
    const stormByHour = new Map(hours.filter((h) => (h.spaceWeather?.g ?? 0) >= 3).map((h) => [Date.parse(h.time), String(h.spaceWeather!.g)]))
    const marked = await page
      .locator('[data-testid="hour-grid"] button.cell[data-storm]')
      .evaluateAll((els) => els.map((e) => [e.getAttribute('data-hour') ?? '', e.getAttribute('data-storm') ?? ''] as const))
    expect(new Map(marked.map(([iso, g]) => [Date.parse(iso), g]))).toEqual(stormByHour)
    if (feedState === 'current') expect(stormByHour.size).toBeGreaterThan(0)
    await screenshot(page, 'corrections-outlook-out-of-range')
  }, 420_000)
})

describe('admin forms for correction quality', { timeout: 120_000 }, () => {
  it('adds a service level with its baseline part and limit, the schema\'s message shown for a bad limit', async () => {
    const { page } = browser
    await browser.context.clearCookies()
    await signIn(page, server.baseUrl, demo.admin)
    await page.goto(`${server.baseUrl}/admin/service-levels`)
    // The seeded RTK level shows its baseline part and limit in the table.
    const table = page.getByTestId('service-levels-table')
    await table.getByText('1 / 1 mm per km', { exact: true }).waitFor()
    await table.getByText('30 km', { exact: true }).waitFor()

    const name = `Network RTK ${stamp}`
    await page.getByTestId('new-service-level').click()
    const form = page.getByTestId('service-level-form')
    await form.getByLabel('Name').fill(name)
    // The demo admin works in inches: 0.5 in is 1.27 cm (1 in = 2.54 cm exactly).
    await page.getByTestId('sigma-input').fill('0.5')
    await page.getByTestId('ppm-h-input').fill('0.5')
    await page.getByTestId('ppm-v-input').fill('1')
    await page.getByTestId('max-baseline-input').fill('0')
    await page.getByTestId('needs-base-input').check()
    await page.getByTestId('save-service-level').click()
    // The message of the shared zod schema, beside the input.
    await form.getByText('The longest baseline must be above 0 km').waitFor()
    await screenshot(page, 'corrections-service-level-form')

    await page.getByTestId('max-baseline-input').fill('40')
    await page.getByTestId('save-service-level').click()
    await page.locator('.ant-message').getByText(`${name} added.`).waitFor()
    const stored = ((await apiFromPage(page, '/api/service-levels')).body as ServiceLevel[]).find((l) => l.name === name)!
    made.push(`/api/service-levels/${stored.id}`)
    expect(stored.sigmaUereM).toBeCloseTo(0.0127, 6)
    expect(stored).toMatchObject({ ppmH: 0.5, ppmV: 1, maxBaselineKm: 40, needsBase: true })
    const row = table.locator('tr', { hasText: name })
    await row.getByText('0.5 / 1 mm per km').waitFor()
    expect(await row.textContent()).toContain('needs a base station')
    await screenshot(page, 'corrections-service-levels-table')

    // Editing keeps the error model: the form opens with the stored values.
    await row.getByRole('button', { name: 'Edit' }).click()
    expect(await page.getByTestId('ppm-h-input').inputValue()).toBe('0.5')
    expect(await page.getByTestId('max-baseline-input').inputValue()).toBe('40')
    expect(await page.getByTestId('needs-base-input').isChecked()).toBe(true)
    await page.getByRole('button', { name: 'Cancel' }).click()
  })

  it('sets what a G3 storm does to a work type, in words, and shows it in the table', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/admin/work-types`)
    const table = page.getByTestId('work-types-table')
    // Seeded: Planting at most Tight, Tile drainage Closed.
    await table.locator('tr', { hasText: 'Planting' }).getByText('At most Tight').waitFor()
    await table.locator('tr', { hasText: 'Tile drainage' }).getByText('Closed').waitFor()

    const name = `Stone picking ${stamp}`
    await page.getByTestId('new-work-type').click()
    const form = page.getByTestId('work-type-form')
    await form.getByLabel('Name').fill(name)
    await page.getByTestId('max-h').fill('10')
    await form.getByLabel(/Work rate/).fill('4')
    await form.getByText('In a G3 or stronger geomagnetic storm').waitFor()
    await page.getByTestId('storm-action').getByText('Closed').click()
    await screenshot(page, 'corrections-work-type-form')
    await page.getByTestId('save-work-type').click()
    await page.locator('.ant-message').getByText(`${name} added.`).waitFor()
    const stored = ((await apiFromPage(page, '/api/work-types')).body as WorkType[]).find((t) => t.name === name)!
    made.push(`/api/work-types/${stored.id}`)
    expect(stored.stormAction).toBe('closed')
    await table.locator('tr', { hasText: name }).getByText('Closed').waitFor()
  })
})
