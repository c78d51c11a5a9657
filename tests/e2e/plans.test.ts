// The office previews and sends the demo farm's weekly plan: the preview shows the e-mail,
// its plain text and the calendar file's events; Send queues the deliveries (jobs of the real
// server process) and a second click sends nothing new; the log shows the delivery; the
// Mailbox holds the message with its .ics attachment.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { PlanSendRow } from '../../shared/schemas/plans'
import { apiFromPage, demo, screenshot, settled, signIn, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser

// Unique per run: a new note makes a new revision, so the test passes on a used database too.
const stamp = Date.now().toString(36)
const note = `Seed for the east fields arrives Tuesday morning (${stamp}).`
const farmName = 'Hollis Creek Farms'

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

describe('plans: preview, send, log and mailbox', { timeout: 180_000 }, () => {
  it('office previews the demo farm plan as the client will read it', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.office)
    await page.getByRole('navigation', { name: 'Main navigation' }).getByRole('link', { name: /Plans/ }).click()
    await page.getByRole('heading', { name: 'Plans', level: 1 }).waitFor()
    // Other suites may have added farms that sort first: choose the demo farm by name.
    await page.getByTestId('plans-farm').click()
    await page.locator('.ant-select-dropdown:not(.ant-select-dropdown-hidden) .ant-select-item-option', { hasText: farmName }).first().click()
    await page.getByTestId('plans-farm').locator('.ant-select-selection-item', { hasText: farmName }).waitFor()
    await page.getByPlaceholder('For example: seed for the east fields').fill(note)
    const mail = page.frameLocator('[data-testid="plan-preview-html"]')
    await mail.getByText(note).waitFor()
    await mail.getByText('Auto-steer must be supervised.', { exact: false }).waitFor()
    await mail.getByText('Passes this week').waitFor()
    await page.getByTestId('plan-recipients').getByText(demo.clientNorth).waitFor()
    await screenshot(page, 'plans-preview')

    await page.getByTestId('plan-preview-view').getByText('Plain text').click()
    const text = await page.getByTestId('plan-preview-text').textContent()
    expect(text).toContain(note)
    expect(text).toContain('PLEASE NOTE: Forecasts cover satellite geometry')
    expect(text).toMatch(/All times are farm time, America\/Chicago \(C[SD]T/)
    await page.getByTestId('plan-preview-view').getByText(/Calendar file/).click()
    await page.getByTestId('plan-preview-ics').waitFor()
    await screenshot(page, 'plans-preview-ics')
    await page.getByTestId('plan-preview-view').getByText('E-mail').click()
  })

  it('sends once; a second click sends nothing new and says so', async () => {
    const { page } = browser
    await page.getByTestId('plan-send').click()
    const result = page.getByTestId('plan-send-result')
    await result.getByText(/is being sent to \d+ recipient/).waitFor()
    await page.getByTestId('plan-revision-state').getByText('This preview is the same plan').waitFor()
    await page.getByTestId('plan-send').click()
    await result.getByText('Nothing new was sent', { exact: true }).waitFor()
    await result.getByText(/already sent/).waitFor()
    await screenshot(page, 'plans-second-click')

    await result.getByRole('button', { name: 'Open the log' }).click()
    const row = page.getByTestId('plan-log').locator('.ant-table-row', { hasText: demo.clientNorth }).first()
    await row.waitFor()
    // The log refreshes itself while deliveries are queued.
    await row.locator('.ant-tag', { hasText: 'sent' }).waitFor({ timeout: 60_000 })
    await screenshot(page, 'plans-log')
    await row.click()
    const drawer = page.getByTestId('plan-sent-drawer')
    await drawer.getByText('Message id').waitFor()
    await drawer.locator('code', { hasText: '@skyfurrow.mail' }).waitFor()
    await screenshot(page, 'plans-sent-drawer')
    await page.locator('.ant-drawer-close').click()

    // Exactly one delivery of this revision to the client, whatever the clicks.
    const url = new URL(page.url())
    const farmId = url.searchParams.get('farm')
    const week = url.searchParams.get('week')
    const log = (await apiFromPage(page, `/api/plans/sends?farmId=${farmId}&weekStart=${week}`)).body as PlanSendRow[]
    const latest = Math.max(...log.map((r) => r.revision))
    const toClient = log.filter((r) => r.revision === latest && r.recipient === demo.clientNorth)
    expect(toClient).toHaveLength(1)
    expect(toClient[0]).toMatchObject({ status: 'sent', resend: 0, sentByName: 'Priya Castellanos' })
    // Another farm's client is not among the recipients.
    expect(log.some((r) => r.recipient === demo.clientSouth)).toBe(false)
  })

  it('sets the automatic weekly send in the farm time zone', async () => {
    const { page } = browser
    await page.getByTestId('plans-tabs').getByText('Automatic send and opt-outs').click()
    const panel = page.getByTestId('plan-schedule')
    await panel.waitFor()
    await panel.getByTestId('plan-schedule-enabled').check()
    const time = panel.getByTestId('plan-schedule-time')
    await time.fill('7:00')
    await panel.getByTestId('plan-schedule-save').click()
    await panel.getByText('Give the time as HH:MM').waitFor()
    await time.fill('07:00')
    await panel.getByTestId('plan-schedule-save').click()
    // Switched on after this week's Monday 07:00: the first automatic send is next Monday's.
    await panel.getByText(/Next automatic send: Monday, \w+ \d+ at 07:00 C[SD]T/).waitFor()
    await page.getByTestId('plan-opt-outs').getByText('Nobody has opted out.').waitFor()
    await screenshot(page, 'plans-automatic')
    await panel.getByTestId('plan-schedule-enabled').uncheck()
    await panel.getByTestId('plan-schedule-save').click()
    await panel.getByText('Automatic send is off.').waitFor()
  })

  it('the plan is in the Mailbox with its .ics attachment', async () => {
    const { page } = browser
    await page.getByRole('navigation', { name: 'Main navigation' }).getByRole('link', { name: /Mailbox/ }).click()
    await page.getByRole('heading', { name: 'Mailbox', level: 1 }).waitFor()
    const row = page.getByTestId('mail-table').locator('.ant-table-row', { hasText: `Weekly plan for ${farmName}` }).filter({ hasText: demo.clientNorth }).first()
    await row.click()
    const viewer = page.getByTestId('mail-viewer')
    await viewer.getByRole('link', { name: /\.ics$/ }).waitFor()
    expect(await viewer.getByText('text/calendar').count()).toBeGreaterThan(0)
    await page.frameLocator('.html-view').getByText(note).waitFor()
    expect(await viewer.getByTestId('mail-text').textContent()).toContain('/api/plans/opt-out?token=')
    await screenshot(page, 'plans-mailbox')
    // As a farm client would read it on a phone.
    await page.setViewportSize({ width: 390, height: 844 })
    await settled(page)
    await viewer.scrollIntoViewIfNeeded()
    await screenshot(page, 'plans-mailbox-phone')
    await page.setViewportSize({ width: 1280, height: 800 })
  })
})
