// Terrain in the browser: on the demo hill farm's page a contractor uploads an elevation
// model (first a wrong file, refused with a sentence), and the sky check of the valley
// floor field draws the terrain as its own band with satellites hidden by it.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HILL_FARM, hollowAsciiGrid } from '../../seed/terrain'
import { apiFromPage, demo, screenshot, signIn, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser
const dir = mkdtempSync(join(tmpdir(), 'skyfurrow-e2e-terrain-'))
const gridFile = join(dir, 'hemlock-hollow.asc')

beforeAll(async () => {
  writeFileSync(gridFile, hollowAsciiGrid())
  server = await startServer()
  browser = await startBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
  await server?.stop()
  rmSync(dir, { recursive: true, force: true })
})

describe('Terrain: upload on the farm page, the band in the sky check', () => {
  it('uploads an elevation model and the sky check of the valley field shows the terrain', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.contractor)
    const farms = (await apiFromPage(page, '/api/farms?pageSize=200')).body as { items: Array<{ id: number; name: string }> }
    const farm = farms.items.find((f) => f.name === HILL_FARM.name)!
    expect(farm).toBeDefined()

    await page.goto(`${server.baseUrl}/farms/${farm.id}`)
    const card = page.getByTestId('terrain-card')
    await card.waitFor()
    await page.getByTestId('terrain-file').setInputFiles({ name: 'notes.tif', mimeType: 'image/tiff', buffer: Buffer.from('not an elevation model') })
    await page.getByTestId('terrain-upload').click()
    await expect.poll(() => page.getByTestId('terrain-error').textContent()).toMatch(/neither a TIFF .* nor an ESRI ASCII grid/)

    await page.getByTestId('terrain-file').setInputFiles(gridFile)
    await page.getByTestId('terrain-upload').click()
    await expect.poll(() => page.getByTestId('terrain-notice').textContent(), { timeout: 30_000 }).toMatch(/forecasts of 2 fields are being recomputed/)
    expect(await page.getByTestId('terrain-fields').textContent()).toContain('Hollow bottom')
    await screenshot(page, 'terrain-farm-uploaded')

    // The sky check on the valley floor, a little west of its east edge (the east wall).
    await page.goto(`${server.baseUrl}/fields?farm=${farm.id}`)
    await page.getByTestId('farm-map').locator('canvas').first().waitFor()
    await page.getByRole('cell', { name: 'Hollow bottom', exact: true }).waitFor()
    // The farm's fields and obstructions are on the map (its view fitted to them) before moving it.
    await page.locator('[data-testid="farm-map"][data-loaded="yes"]').waitFor()
    await page.getByTestId('goto').fill('41.2620, -77.41889')
    await page.getByTestId('goto').press('Enter')
    await page.getByTestId('tool-sky-check').click()
    await expect.poll(() => page.getByTestId('tool-help').textContent()).toMatch(/Click a point inside a field/)
    await page.evaluate(() => window.scrollTo(0, 0))
    const box = (await page.getByTestId('farm-map').boundingBox())!
    const panel = page.getByTestId('sky-check')
    // Click the map's centre, again if the map was still moving to the address at the first
    // click (the sky check of a point takes a moment to open, so give each click time).
    for (let attempt = 1; ; attempt++) {
      await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2)
      const opened = await panel.waitFor({ timeout: 8_000 }).then(() => true, () => false)
      if (opened || attempt === 4) break
    }
    await expect.poll(() => panel.locator('h2').textContent()).toContain('Hollow bottom')
    await page.getByTestId('terrain-cut').waitFor({ timeout: 15_000 })
    await expect.poll(() => page.getByTestId('sky-terrain').textContent()).toMatch(/the ground rises to \d+(\.\d)?° towards (E|NE|SE|ENE|ESE)/)
    expect(await page.getByTestId('terrain-legend').textContent()).toContain('sky hidden by the terrain')
    await panel.scrollIntoViewIfNeeded()
    await screenshot(page, 'terrain-sky-check')
  }, 120_000)
})
