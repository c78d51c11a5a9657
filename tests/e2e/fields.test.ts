// A contractor draws a field and a tree line on the offline map, sees the field's area,
// and opens the sky check beside the tree line: raising the tree line lifts the horizon
// cut that the sky view shows. A boundary that crosses itself is refused with a marker.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/db/index.ts'
import { apiFromPage, demo, screenshot, signIn, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser

const stamp = Date.now().toString(36)
const fieldName = `Creek quarter ${stamp}`
// An empty spot (no demo data there), different on every run.
const lat = 41.5 + (Date.now() % 1000) / 10_000
const lon = -95.2

/** The highest field and obstruction ids before this file drew or uploaded any (files run one at a time). */
let before = { field: 0, obstruction: 0 }
const database = openDatabase(process.env.DATABASE_URL ?? '', { connectionLimit: 2 })
const highest = async (table: 'fields' | 'obstructions') =>
  Number((((await database.pool.query(`SELECT COALESCE(MAX(id), 0) AS id FROM ${table}`)) as unknown as [[{ id: number }]])[0][0]).id)

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
  before = { field: await highest('fields'), obstruction: await highest('obstructions') }
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
  // What this file drew and uploaded goes (the fields take their stored hours with them),
  // so that no later file finds it on the demo farm.
  await database.pool.query('DELETE FROM fields WHERE id > ?', [before.field])
  await database.pool.query('DELETE FROM obstructions WHERE id > ?', [before.obstruction])
  await database.close()
})

type Page = RunningBrowser['page']

/**
 * The map element's box, and a click helper in map pixels relative to its centre. The page
 * is scrolled to the top first: a panel below the map (the sky check) may have scrolled
 * it, and the sticky header would then cover the map's upper edge.
 */
/** Waits until the farm's fields and obstructions are on the map (its view fitted to them). */
async function mapLoaded(page: Page): Promise<void> {
  await page.getByTestId('farm-map').locator('canvas').first().waitFor()
  await page.locator('[data-testid="farm-map"][data-loaded="yes"]').waitFor()
}

async function mapFrame(page: Page) {
  await page.evaluate(() => window.scrollTo(0, 0))
  const box = await page.getByTestId('farm-map').boundingBox()
  if (!box) throw new Error('The map has no box')
  const cx = box.x + box.width / 2
  const cy = box.y + box.height / 2
  return {
    click: async (dx: number, dy: number) => {
      await page.mouse.click(cx + dx, cy + dy)
      await page.waitForTimeout(350)
    },
    dblclick: async (dx: number, dy: number) => {
      await page.mouse.dblclick(cx + dx, cy + dy)
      await page.waitForTimeout(350)
    },
  }
}

/**
 * Picks a map tool and waits until the page says it is active (its help line shows):
 * a click on the map before that would still go to the previous tool.
 */
async function chooseTool(page: Page, tool: string, help: RegExp): Promise<void> {
  await page.getByTestId(`tool-${tool}`).click()
  await expect.poll(() => page.getByTestId('tool-help').textContent()).toMatch(help)
}

/** The number at the start of a text such as "12.4° elevation, towards E (92°)". */
function leadingNumber(text: string | null): number {
  const m = /-?\d+(?:\.\d+)?/.exec((text ?? '').replace(/,/g, ''))
  if (!m) throw new Error(`No number in "${text}"`)
  return Number(m[0])
}

/** The height number box (ant-design-vue puts the test id on the box or on its input). */
function heightInput(page: Page) {
  return page.locator('input[data-testid="obstruction-height"], [data-testid="obstruction-height"] input').first()
}

async function horizonPeak(page: Page): Promise<string> {
  return (await page.getByTestId('sky-horizon-peak').textContent())?.trim() ?? ''
}

describe('Fields: drawing, areas and the live sky check', () => {
  it('draws a field, names it, saves it and shows its area', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.contractor)
    await page.goto(`${server.baseUrl}/fields`)
    await page.getByRole('heading', { name: 'Fields', level: 1 }).waitFor()
    await mapLoaded(page)
    await screenshot(page, 'fields-farm-loaded')

    await page.getByTestId('goto').fill(`${lat.toFixed(4)}, ${lon}`)
    await page.getByTestId('goto').press('Enter')

    await chooseTool(page, 'draw-field', /corners of the field; double-click to finish/)
    const map = await mapFrame(page)
    await map.click(-160, -110)
    await map.click(140, -110)
    await map.click(140, 110)
    // While drawing, the area so far is shown over the map.
    await expect.poll(() => page.getByTestId('sketch-area').textContent()).toMatch(/ha/)
    await map.dblclick(-160, 110)

    const editor = page.getByTestId('field-editor')
    await editor.waitFor()
    const drawnArea = (await page.getByTestId('field-area').textContent()) ?? ''
    expect(drawnArea).toMatch(/\d[\d.,]* ha \([\d.,]+ ac\)|\d[\d.,]* ac \([\d.,]+ ha\)/)
    await page.getByTestId('field-name').fill(fieldName)
    await page.getByTestId('save-field').click()
    await page.locator('.ant-message').getByText(`${fieldName} saved`).waitFor()
    await screenshot(page, 'fields-drawn-field')

    // The server stored it with the area the page shows.
    const farmId = Number(new URL(page.url()).searchParams.get('farm'))
    expect(farmId).toBeGreaterThan(0)
    const list = await apiFromPage(page, `/api/farms/${farmId}/fields`)
    expect(list.status).toBe(200)
    const stored = (list.body as { name: string; areaHa: number }[]).find((f) => f.name === fieldName)
    expect(stored).toBeDefined()
    // 300 x 220 px at zoom 16 near 41.5 N (about 1.83 m per px): about 22 ha.
    expect(stored!.areaHa).toBeGreaterThan(15)
    expect(stored!.areaHa).toBeLessThan(30)
    const shownHa = /([\d.,]+) ha/.exec((await page.getByTestId('field-area').textContent()) ?? '')
    expect(shownHa).not.toBeNull()
    expect(Math.abs(Number(shownHa![1].replace(/,/g, '')) - stored!.areaHa)).toBeLessThan(0.1)

    // The table beside the map lists it once the editor is closed (found by its name).
    await editor.getByRole('button', { name: 'Close' }).click()
    await page.getByLabel('Search fields').first().fill(fieldName)
    await page.getByTestId('fields-table').getByText(fieldName).waitFor()
    await page.getByLabel('Search fields').first().fill('')
  }, 90_000)

  it('draws a tree line beside the field and the sky check follows its height', async () => {
    const { page } = browser
    const map = await mapFrame(page)

    await chooseTool(page, 'tree-line', /Click along the tree line/)
    await map.click(162, -100)
    await map.dblclick(162, 100)
    const editor = page.getByTestId('obstruction-editor')
    await editor.waitFor()
    // The height box is in the user's units (this contractor may work in feet).
    const label = (await editor.locator('label', { hasText: /^Height \((m|ft)\)$/ }).textContent()) ?? ''
    const feet = label.includes('ft')
    const typed = (m: number) => (feet ? String(Math.round(m / 0.3048)) : String(m))
    const metres = (text: string) => (feet ? Number(text) * 0.3048 : Number(text))
    await heightInput(page).fill(typed(10))
    await heightInput(page).press('Tab')
    await page.getByTestId('save-obstruction').click()
    await page.locator('.ant-message').getByText(feet ? 'Tree line saved (33 ft)' : 'Tree line saved (10 m)').waitFor()
    // The saved tree line queues recomputes of the farm's fields: the header shows them.
    await page.getByTestId('job-progress').waitFor({ timeout: 10_000 })
    expect(await page.getByTestId('job-progress').textContent()).toMatch(/Updating \d+ field forecasts?/)
    await screenshot(page, 'fields-recompute-progress')

    // Sky check at a point inside the field, a little west of the tree line.
    await chooseTool(page, 'sky-check', /Click a point inside a field/)
    await map.click(128, 0)
    const panel = page.getByTestId('sky-check')
    await panel.waitFor()
    await page.getByTestId('sky-plot').waitFor()
    await expect.poll(() => horizonPeak(page), { timeout: 15_000 }).toMatch(/towards E/)
    const low = leadingNumber(await horizonPeak(page))
    const blockedLow = leadingNumber(await page.getByTestId('sky-blocked').textContent())
    expect(await page.getByTestId('sky-hdop').textContent()).toMatch(/^\d+\.\d\d$|no fix/)
    await screenshot(page, 'fields-sky-check-10m')

    // Raise the tree line (unsaved): the horizon cut rises without saving.
    await heightInput(page).fill(typed(30))
    await heightInput(page).press('Tab')
    await expect.poll(async () => leadingNumber(await horizonPeak(page)), { timeout: 5_000 }).toBeGreaterThan(low + 10)
    const high = leadingNumber(await horizonPeak(page))
    const blockedHigh = leadingNumber(await page.getByTestId('sky-blocked').textContent())
    expect(blockedHigh).toBeGreaterThanOrEqual(blockedLow)
    // Geometry: the cut is atan((h - antenna) / d); d from the first reading, then the second must agree.
    const antennaM = 3.5
    const distanceM = (metres(typed(10)) - antennaM) / Math.tan((low * Math.PI) / 180)
    const expectedHigh = (Math.atan((metres(typed(30)) - antennaM) / distanceM) * 180) / Math.PI
    expect(Math.abs(high - expectedHigh)).toBeLessThan(1.5)

    // The slider drives the same value: one step down from 30 m lowers the cut.
    await page.getByTestId('obstruction-editor').locator('.ant-slider-handle').first().focus()
    await page.keyboard.press('ArrowLeft')
    await expect.poll(async () => leadingNumber(await horizonPeak(page))).toBeLessThan(high)
    await screenshot(page, 'fields-sky-check-30m')

    // Moving the time changes the satellites, not the horizon.
    const timeBefore = await page.getByTestId('sky-time').textContent()
    await page.getByTestId('sky-check').locator('.time .ant-slider-handle').first().focus()
    for (let i = 0; i < 8; i++) await page.keyboard.press('ArrowRight')
    await expect.poll(() => page.getByTestId('sky-time').textContent()).not.toBe(timeBefore)
    await page.getByTestId('sky-now').click()
    await expect.poll(() => page.getByTestId('sky-time').textContent()).toBe(timeBefore)
    expect(await page.getByTestId('safety-caution').first().textContent()).toContain('Auto-steer must be supervised')
  }, 90_000)

  it('refuses a boundary that crosses itself and marks where', async () => {
    const { page } = browser
    await page.getByRole('button', { name: 'Close sky check' }).click()
    await chooseTool(page, 'draw-field', /corners of the field; double-click to finish/)
    const map = await mapFrame(page)
    // A bow tie north of the first field.
    await map.click(-100, -250)
    await map.click(40, -140)
    await map.click(40, -250)
    await map.dblclick(-100, -140)
    await page.getByTestId('field-editor').waitFor()
    await page.getByTestId('field-name').fill(`Bow tie ${stamp}`)
    await page.getByTestId('save-field').click()
    const error = page.getByTestId('boundary-error')
    await error.waitFor().catch(async (failure: unknown) => {
      await screenshot(page, 'fields-boundary-failed')
      throw failure
    })
    expect(await error.textContent()).toMatch(/crosses itself/)
    await screenshot(page, 'fields-boundary-crosses')
    const farmId = Number(new URL(page.url()).searchParams.get('farm'))
    const list = await apiFromPage(page, `/api/farms/${farmId}/fields`)
    expect((list.body as { name: string }[]).some((f) => f.name === `Bow tie ${stamp}`)).toBe(false)
  }, 90_000)

  it('uploads a GeoJSON file, previews its areas, names them from an attribute and adds them', async () => {
    const { page } = browser
    // Two invented rectangles south of the drawn field, with a name attribute.
    const rect = (south: number, name: string) => ({
      type: 'Feature',
      properties: { FIELD_NAME: name, acres: 40 },
      geometry: {
        type: 'Polygon',
        coordinates: [[[lon - 0.004, south], [lon + 0.002, south], [lon + 0.002, south + 0.003], [lon - 0.004, south + 0.003], [lon - 0.004, south]]],
      },
    })
    const names = [`South forty ${stamp}`, `Bottom ground ${stamp}`]
    const file = { type: 'FeatureCollection', features: [rect(lat - 0.01, names[0]), rect(lat - 0.015, names[1])] }
    // The refused bow tie is still open: throw it away, back to the table.
    await page.getByTestId('field-editor').getByRole('button', { name: 'Throw away' }).click()
    await page.getByTestId('fields-table').waitFor()
    await page.getByTestId('open-import').click()
    await page.getByTestId('import-file').setInputFiles({ name: 'fields.geojson', mimeType: 'application/geo+json', buffer: Buffer.from(JSON.stringify(file)) })
    await page.getByTestId('import-read').click()
    const list = page.getByTestId('import-features')
    await list.locator('li').nth(1).waitFor()
    expect(await list.locator('li').count()).toBe(2)
    // Names come from the FIELD_NAME attribute.
    expect(await list.locator('li').nth(0).locator('input[type="text"], input:not([type])').first().inputValue()).toBe(names[0])
    await screenshot(page, 'fields-import-preview')
    await page.getByTestId('import-create').click()
    await page.locator('.ant-message').getByText('2 fields added').waitFor()
    // The table finds them by name (the demo farm may hold more fields than one page).
    for (const name of names) {
      await page.getByLabel('Search fields').first().fill(name)
      await page.getByTestId('fields-table').getByText(name).waitFor()
    }
    await screenshot(page, 'fields-imported')
  }, 60_000)

  it('uploads a KML file from a farm-mapping tool and names the field from its placemark', async () => {
    const { page } = browser
    // An invented placemark further south; the OGC KML 2.2 standard writes coordinates lon,lat[,alt].
    const name = `Creek flats ${stamp}`
    const s = lat - 0.022
    const ring = [[lon - 0.004, s], [lon + 0.002, s], [lon + 0.002, s + 0.003], [lon - 0.004, s + 0.003], [lon - 0.004, s]]
    const kml = `<?xml version="1.0" encoding="UTF-8"?>
<kml xmlns="http://www.opengis.net/kml/2.2"><Document><Placemark><name>${name}</name>
<Polygon><outerBoundaryIs><LinearRing><coordinates>${ring.map(([x, y]) => `${x},${y},0`).join(' ')}</coordinates></LinearRing></outerBoundaryIs></Polygon>
</Placemark></Document></kml>`
    await page.getByTestId('open-import').click()
    await page.getByTestId('import-file').setInputFiles({ name: 'flats.kml', mimeType: 'application/vnd.google-earth.kml+xml', buffer: Buffer.from(kml) })
    await page.getByTestId('import-read').click()
    const list = page.getByTestId('import-features')
    await list.locator('li').first().waitFor()
    expect(await list.locator('li').count()).toBe(1)
    expect(await list.locator('li').first().locator('input[type="text"], input:not([type])').first().inputValue()).toBe(name)
    await page.getByTestId('import-create').click()
    await page.locator('.ant-message').getByText('1 field added').waitFor()
    await page.getByLabel('Search fields').first().fill(name)
    await page.getByTestId('fields-table').getByText(name).waitFor()
  }, 60_000)

  it('cuts a pond out of the drawn field and adds a second part across the road', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/fields`)
    await mapLoaded(page)
    await page.getByTestId('goto').fill(`${lat.toFixed(4)}, ${lon}`)
    await page.getByTestId('goto').press('Enter')
    const map = await mapFrame(page)
    const haShown = async () => Number(/([\d.,]+) ha/.exec((await page.getByTestId('field-area').textContent()) ?? '')![1].replace(/,/g, ''))

    // The same view as when it was drawn: the field spans -160..140 x -110..110 px.
    await chooseTool(page, 'select', /Click a field or obstruction to edit it/)
    await map.click(-100, -60)
    await page.getByTestId('field-editor').waitFor()
    expect(await page.getByTestId('field-name').inputValue()).toBe(fieldName)
    const whole = await haShown()
    // About 1.83 m per px here: a 60 x 60 px square is about 1.2 ha.
    const square = (60 * 1.83) ** 2 / 10_000

    await chooseTool(page, 'cut-hole', /Draw a pond/)
    await map.click(-60, -40)
    await map.click(0, -40)
    await map.click(0, 20)
    await map.dblclick(-60, 20)
    await expect.poll(haShown).toBeLessThan(whole)
    const withHole = await haShown()
    expect(Math.abs(whole - withHole - square)).toBeLessThan(0.35)

    await chooseTool(page, 'add-part', /Draw another part/)
    await map.click(-260, -110)
    await map.click(-200, -110)
    await map.click(-200, -50)
    await map.dblclick(-260, -50)
    await expect.poll(haShown).toBeGreaterThan(withHole)
    expect(Math.abs(await haShown() - withHole - square)).toBeLessThan(0.35)
    await screenshot(page, 'fields-hole-and-part')

    await page.getByTestId('save-field').click()
    await page.locator('.ant-message').getByText(`${fieldName} saved`).last().waitFor()
    const farmId = Number(new URL(page.url()).searchParams.get('farm'))
    const list = (await apiFromPage(page, `/api/farms/${farmId}/fields`)).body as { name: string; boundary: { type: string; coordinates: number[][][][] } }[]
    const stored = list.find((f) => f.name === fieldName)!
    expect(stored.boundary.type).toBe('MultiPolygon')
    expect(stored.boundary.coordinates).toHaveLength(2)
    // The part that was drawn first keeps its outer ring and the pond as a hole.
    expect(stored.boundary.coordinates[0]).toHaveLength(2)
    expect(stored.boundary.coordinates[1]).toHaveLength(1)
  }, 90_000)
})
