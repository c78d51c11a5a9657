// The admin sets up a farm and invites its client; the invitation arrives in the Mailbox,
// the new client sets a password from the link and sees only that farm.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  apiFromPage,
  demo,
  navigationLabels,
  screenshot,
  signIn,
  signOut,
  startBrowser,
  startServer,
  type RunningBrowser,
  type RunningServer,
} from './support'

let server: RunningServer
let browser: RunningBrowser

// Unique per run, so the test also passes against a database an earlier run used.
const stamp = Date.now().toString(36)
const farmName = `Willow Bend ${stamp}`
const clientEmail = `grower.${stamp}@example.test`
const clientName = `Rosa Lindqvist ${stamp}`
const clientPassword = 'harrow-and-sky-42'

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

/** Picks an option in an ant-design-vue select by typing and choosing the matching entry. */
async function chooseOption(page: RunningBrowser['page'], testId: string, text: string, option: string | RegExp) {
  await page.getByTestId(testId).click()
  await page.keyboard.type(text)
  await page.locator('.ant-select-dropdown:visible .ant-select-item-option', { hasText: option }).first().click()
}

describe('admin: farms, users and the invitation mail', { timeout: 120_000 }, () => {
  it('creates a farm with a time zone and finds it by search', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.admin)
    await page.getByRole('navigation', { name: 'Main navigation' }).getByRole('link', { name: /Farms/ }).click()
    await page.getByRole('heading', { name: 'Farms', level: 1 }).waitFor()
    await page.getByTestId('farms-table').locator('.ant-table-row').first().waitFor()
    await screenshot(page, 'admin-farms')

    await page.getByTestId('new-farm').click()
    const form = page.getByTestId('farm-form')
    await form.waitFor()
    // The shared schema refuses an empty name before anything is sent.
    await form.getByLabel('Farm name').fill('')
    await page.getByTestId('save-farm').click()
    await form.getByText('Enter the farm name').waitFor()

    await form.getByLabel('Farm name').fill(farmName)
    // The message goes away as soon as the field is corrected.
    await form.getByText('Enter the farm name').waitFor({ state: 'detached' })
    await chooseOption(page, 'farm-time-zone', 'Winnipeg', 'America/Winnipeg')
    await form.getByLabel('Address').fill('Range Road 41\nNear Carman, Manitoba')
    await form.getByLabel('Notes for the crews').fill('Shelterbelt of tall poplars along the north edge.')
    await screenshot(page, 'admin-farm-form')
    await page.getByTestId('save-farm').click()
    await form.waitFor({ state: 'detached' })

    await page.getByLabel('Search farms').fill(farmName)
    await page.getByLabel('Search farms').press('Enter')
    // The new farm is in the list from before the search too: wait for the search's answer.
    await expect.poll(() => page.getByTestId('farms-table').locator('.ant-table-row').count(), { timeout: 30_000 }).toBe(1)
    const row = page.getByTestId('farms-table').locator('.ant-table-row', { hasText: farmName })
    await row.waitFor()
    expect(await row.textContent()).toContain('America/Winnipeg')
  })

  it('shows the server\'s field error when inviting an e-mail that already has an account', async () => {
    const { page } = browser
    await page.getByRole('navigation', { name: 'Main navigation' }).getByRole('link', { name: /Users/ }).click()
    await page.getByRole('heading', { name: 'Users', level: 1 }).waitFor()
    await page.getByTestId('users-table').locator('.ant-table-row').first().waitFor()
    await screenshot(page, 'admin-users')

    await page.getByTestId('invite-user').click()
    const form = page.getByTestId('user-form')
    await form.getByLabel('E-mail', { exact: true }).fill(demo.office)
    await form.getByLabel('Name', { exact: true }).fill('Someone Else')
    await page.getByTestId('save-user').click()
    await form.getByText('A user with this e-mail already exists.').waitFor()
    await screenshot(page, 'admin-invite-duplicate')
    await page.getByRole('button', { name: 'Cancel' }).click()
    await form.waitFor({ state: 'detached' })
  })

  it('invites a farm client linked to the new farm', async () => {
    const { page } = browser
    await page.getByTestId('invite-user').click()
    const form = page.getByTestId('user-form')
    await form.getByLabel('E-mail', { exact: true }).fill(clientEmail)
    await form.getByLabel('Name', { exact: true }).fill(clientName)
    await form.getByText('Farm client', { exact: true }).click()
    await chooseOption(page, 'user-farms', farmName.slice(0, 12), farmName)
    await page.getByTestId('save-user').click()
    await form.waitFor({ state: 'detached' })

    await page.getByLabel('Search users').fill(clientEmail)
    await page.getByLabel('Search users').press('Enter')
    const row = page.getByTestId('users-table').locator('.ant-table-row', { hasText: clientName })
    await row.waitFor()
    expect(await row.textContent()).toContain('No password set yet')
    expect(await row.textContent()).toContain(farmName)
    await screenshot(page, 'admin-user-invited')
  })

  it('finds the invitation in the Mailbox with a working set-password link', async () => {
    const { page } = browser
    await page.getByRole('navigation', { name: 'Main navigation' }).getByRole('link', { name: /Mailbox/ }).click()
    await page.getByRole('heading', { name: 'Mailbox', level: 1 }).waitFor()
    const row = page.getByTestId('mail-table').locator('.ant-table-row', { hasText: clientEmail })
    await row.waitFor()
    expect(await row.textContent()).toContain('invited you to Skyfurrow')
    await row.click()
    const text = page.getByTestId('mail-text')
    await text.waitFor()
    const link = text.getByRole('link', { name: /reset-password\?token=/ })
    const href = await link.getAttribute('href')
    expect(href).toMatch(/\/reset-password\?token=[^&\s]+&invite=1$/)
    // The formatted version sits in a sandboxed frame with no scripts.
    const frame = page.locator('iframe.html-view')
    expect(await frame.getAttribute('sandbox')).toBe('allow-popups allow-popups-to-escape-sandbox')
    expect(await page.frameLocator('iframe.html-view').getByText('Set your password').count()).toBeGreaterThan(0)
    await screenshot(page, 'mailbox-invite')

    await signOut(page)

    // The invited client sets a password from the link ...
    await page.goto(href!.replace(/^https?:\/\/[^/]+/, server.baseUrl))
    await page.getByRole('heading', { name: 'Welcome to Skyfurrow' }).waitFor()
    await page.getByLabel('New password').fill(clientPassword)
    await page.getByLabel('The same password again').fill(clientPassword)
    await screenshot(page, 'invite-set-password')
    await page.getByRole('button', { name: 'Set my password' }).click()
    await page.getByTestId('password-set').waitFor()

    // ... signs in, and sees the client navigation and only the new farm.
    await signIn(page, server.baseUrl, clientEmail, clientPassword)
    expect(await navigationLabels(page)).toEqual(['Outlook', 'Passes', 'Corrections'])
    const farms = await apiFromPage(page, '/api/farms?pageSize=200')
    expect(farms.status).toBe(200)
    const items = (farms.body as { items: { id: number; name: string }[] }).items
    expect(items.map((f) => f.name)).toEqual([farmName])
    await page.goto(`${server.baseUrl}/farms/${items[0]!.id}`)
    await page.getByRole('heading', { name: farmName, level: 1 }).waitFor()
    expect(await page.getByText('Shelterbelt of tall poplars along the north edge.').isVisible()).toBe(true)
    await screenshot(page, 'invited-client-farm')

    // The link worked once: opening it again is refused.
    await signOut(page)
    await page.goto(href!.replace(/^https?:\/\/[^/]+/, server.baseUrl))
    await page.getByLabel('New password').fill('another-password-1')
    await page.getByLabel('The same password again').fill('another-password-1')
    await page.getByRole('button', { name: 'Set my password' }).click()
    await page.getByTestId('link-problem').waitFor()
    expect(await page.getByLabel('New password').count()).toBe(0)
    await screenshot(page, 'invite-link-used')
  })

  it('changes the account profile and units from the user menu', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.contractor)
    const unitsNow = () => page.evaluate(async () => (await (await fetch('/api/auth/me')).json()).units as string)
    // Switch to the other system and back, so the demo account keeps the units it had
    // (other browser tests read it in its own units, whatever ran before).
    const before = await unitsNow()
    const other = before === 'imperial' ? 'metric' : 'imperial'
    const label = { imperial: 'Imperial (ac, ft, in)', metric: 'Metric (ha, m, cm)' } as const
    await page.getByTestId('user-menu').click()
    await page.getByRole('menuitem', { name: 'Profile and units' }).click()
    await page.getByRole('heading', { name: 'Your account', level: 1 }).waitFor()
    await page.getByText(label[other]).click()
    await page.getByRole('button', { name: 'Save profile' }).click()
    await page.getByText('Profile saved.').waitFor()
    await screenshot(page, 'account')
    expect(await unitsNow()).toBe(other)
    await page.getByText(label[before as 'imperial' | 'metric']).click()
    await page.getByRole('button', { name: 'Save profile' }).click()
    await page.getByText('Profile saved.').first().waitFor()
    await expect.poll(unitsNow).toBe(before)
    await signOut(page)
  })
})
