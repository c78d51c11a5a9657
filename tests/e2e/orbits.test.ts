// Office staff keep the orbit data: a small TLE file becomes a named orbit set (a broken
// record in it is skipped and named), a file with no usable record is refused record by
// record, the set's satellites are listed with their element age, and the nominal
// constellations stay available and labelled as such.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { apiFromPage, demo, root, screenshot, signIn, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser
const stamp = Date.now().toString(36)

// Three records of the project's invented GPS sample (tests/fixtures/precision/orbits).
const sample = readFileSync(join(root, 'tests', 'fixtures', 'precision', 'orbits', 'gps-sample.tle'), 'utf8')
  .split(/\r?\n/)
  .filter((l) => l.trim() !== '')
const goodRecords = sample.slice(0, 9)

/** Changes the checksum digit at the end of a TLE line, so that the line no longer checks. */
function breakChecksum(line: string): string {
  const digit = Number(line.at(-1))
  return line.slice(0, -1) + String((digit + 1) % 10)
}

// Uncaught errors in the page fail the test with their message.
const pageErrors: string[] = []

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
  browser.page.on('pageerror', (error) => pageErrors.push(error.message))
  browser.page.on('console', (m) => {
    // Refused requests (a 400 on purpose) are logged by the browser; only script errors count.
    if (m.type() === 'error' && !m.text().startsWith('Failed to load resource')) pageErrors.push(m.text())
  })
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

describe('Orbits: orbit sets, problems record by record', () => {
  it('uploads a small TLE file into a named set, with the one broken record named', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.office)
    await page.goto(`${server.baseUrl}/orbits`)
    await page
      .getByRole('heading', { name: 'Orbits', level: 1 })
      .waitFor()
      .catch(async (error: Error) => {
        await screenshot(page, 'orbits-failed')
        throw new Error(`${error.message}\nPage errors: ${pageErrors.join(' | ')}`)
      })

    // Every constellation with a nominal set offers it, labelled nominal.
    const active = page.getByTestId('active-orbits')
    await active.locator('tr[data-system="GPS"]').waitFor()
    for (const system of ['GPS', 'GLONASS', 'Galileo', 'BeiDou']) {
      await active.locator(`tr[data-system="${system}"]`).getByText(/Nominal/).first().waitFor()
    }

    // Three good records and a fourth whose line 2 checksum is wrong.
    const broken = [sample[9], sample[10], breakChecksum(sample[11])]
    const text = [...goodRecords, ...broken].join('\n') + '\n'
    const name = `Week test ${stamp}`
    await page.getByTestId('orbit-file').setInputFiles({ name: 'gps-week.tle', mimeType: 'text/plain', buffer: Buffer.from(text) })
    await page.getByTestId('orbit-set-name').fill(name)
    await page.getByTestId('orbit-upload').click()

    const result = page.getByTestId('orbit-upload-result')
    await result.waitFor()
    expect(await result.textContent()).toContain(`${name}: 3 satellites read, 1 record skipped`)
    const problemRows = result.getByTestId('record-problems').locator('.ant-table-row')
    expect(await problemRows.count()).toBe(1)
    const row = (await problemRows.first().textContent()) ?? ''
    expect(row).toMatch(/record 4/)
    expect(row).toMatch(/checksum/i)

    // The set is listed with its satellites and age; the drawer lists the satellites.
    const sets = page.getByTestId('orbit-sets')
    const setRow = sets.locator('.ant-table-row', { hasText: name })
    await setRow.waitFor()
    expect(await setRow.textContent()).toContain('GPS 3')
    // The sample's elements are dated 1 December 2026: the age shown follows the clock.
    const listed = await apiFromPage(page, '/api/orbit-sets')
    const stored = (listed.body as { name: string; ageWarning: boolean; ageDays: number }[]).find((s) => s.name === name)
    expect(stored).toBeDefined()
    expect((await setRow.getByTestId('orbit-set-old').count()) > 0).toBe(stored!.ageWarning)
    await setRow.getByRole('button', { name: 'Satellites' }).click()
    const drawer = page.getByTestId('orbit-satellites')
    await drawer.locator('.ant-table-row').first().waitFor()
    expect(await drawer.locator('.ant-table-row').count()).toBe(3)
    expect(await drawer.textContent()).toContain('90001')
    await screenshot(page, 'orbits-set-satellites')
    await page.keyboard.press('Escape')
    await screenshot(page, 'orbits-uploaded')
  }, 90_000)

  it('refuses a file without a usable record and lists every record with its line', async () => {
    const { page } = browser
    const bad = [sample[0], breakChecksum(sample[1]), sample[2], sample[3], sample[4], breakChecksum(sample[5])].join('\n') + '\n'
    await page.getByTestId('orbit-file').setInputFiles({ name: 'broken.tle', mimeType: 'text/plain', buffer: Buffer.from(bad) })
    await page.getByTestId('orbit-set-name').fill(`Broken ${stamp}`)
    await page.getByTestId('orbit-upload').click()
    const refused = page.getByTestId('orbit-upload-refused')
    await refused.waitFor()
    expect(await refused.textContent()).toContain('Nothing was stored')
    const rows = refused.getByTestId('record-problems').locator('.ant-table-row')
    expect(await rows.count()).toBe(2)
    const first = (await rows.nth(0).textContent()) ?? ''
    const second = (await rows.nth(1).textContent()) ?? ''
    expect(first).toMatch(/record 1/)
    expect(second).toMatch(/record 2/)
    expect(first + second).toMatch(/checksum/i)
    expect(await refused.textContent()).toContain('2 records skipped')
    await screenshot(page, 'orbits-refused')

    const listed = await apiFromPage(page, '/api/orbit-sets')
    expect((listed.body as { name: string }[]).some((s) => s.name === `Broken ${stamp}`)).toBe(false)
  }, 60_000)

  it('enters, edits and removes a satellite outage', async () => {
    const { page } = browser
    const satId = `G${String(Date.now() % 90).padStart(2, '0')}`
    await page.getByTestId('add-outage').click()
    const form = page.getByTestId('outage-form')
    await form.waitFor()
    // The end before the start is refused with the shared schema's words.
    await page.getByTestId('outage-sat').fill(satId)
    await page.getByTestId('outage-from').fill('2026-12-10T08:00')
    await page.getByTestId('outage-to').fill('2026-12-10T06:00')
    await page.getByTestId('save-outage').click()
    await form.getByText('The end must be after the start').waitFor()
    await page.getByTestId('outage-to').fill('2026-12-10T14:00')
    await page.getByTestId('save-outage').click()
    const row = page.getByTestId('outages').locator('.ant-table-row', { hasText: satId })
    await row.waitFor()
    await screenshot(page, 'orbits-outage')

    await row.getByRole('button', { name: 'Edit' }).click()
    await page.getByTestId('outage-form').getByPlaceholder(/Notice advisory/).fill('Clock maintenance')
    await page.getByTestId('save-outage').click()
    await row.getByText('Clock maintenance').waitFor()
    const listed = await apiFromPage(page, '/api/outages')
    const stored = (listed.body as { satId: string; from: string; to: string; note: string }[]).find((o) => o.satId === satId)
    expect(stored?.note).toBe('Clock maintenance')
    expect(Date.parse(stored!.to) - Date.parse(stored!.from)).toBe(6 * 3600_000)

    await row.getByRole('button', { name: 'Remove' }).click()
    await page.locator('.ant-popover').getByRole('button', { name: 'Remove' }).click()
    await row.waitFor({ state: 'detached' })
    expect(pageErrors).toEqual([])
  }, 60_000)

  it('fetches the daily feed on request and shows how it went', async () => {
    const { page } = browser
    // The status shows minutes only, and an earlier run may have been in the same minute:
    // wait for a run that started after the click, then read what the page says of it.
    const clickedAt = Date.now() - 1_000
    await page.getByTestId('feed-run').click()
    const lastRunAt = () =>
      page.evaluate(async () => {
        const res = await fetch('/api/orbit-feed/status', { credentials: 'same-origin' })
        const body = (await res.json()) as { lastRun?: { at?: string } | null }
        return body.lastRun?.at ? Date.parse(body.lastRun.at) : 0
      })
    await expect.poll(lastRunAt, { timeout: 45_000 }).toBeGreaterThanOrEqual(clickedAt)
    await expect.poll(() => page.getByTestId('feed-last').textContent(), { timeout: 15_000 }).toMatch(/fetched|failed/)
    await screenshot(page, 'orbits-feed')
  }, 60_000)
})
