// Each demo account signs in and sees exactly its role's navigation; clients cannot reach
// another farm or a page for other roles, by URL or by API.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { SessionUser } from '@shared/schemas'
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

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

/**
 * What each role must see. Clients and contractors: exactly these links. Staff: these
 * links in this order, never the `forbidden` ones; pages added later for staff (listed in
 * the navigation unit test) may sit between them.
 */
const expected: {
  email: string
  role: SessionUser['role']
  shot: string
  links: string[]
  exact: boolean
  forbidden: string[]
}[] = [
  {
    email: demo.admin,
    role: 'admin',
    shot: 'nav-admin',
    links: ['Outlook', 'Fields', 'Passes', 'Plans', 'Orbits', 'Farms', 'Users', 'Work types', 'Service levels', 'Mailbox'],
    exact: false,
    forbidden: [],
  },
  {
    email: demo.office,
    role: 'office',
    shot: 'nav-office',
    links: ['Outlook', 'Fields', 'Passes', 'Plans', 'Orbits', 'Work types', 'Service levels', 'Mailbox'],
    exact: false,
    forbidden: ['Farms', 'Users'],
  },
  {
    email: demo.contractor,
    role: 'contractor',
    shot: 'nav-contractor',
    links: ['Outlook', 'Fields', 'Passes', 'In the cab', 'Corrections'],
    exact: true,
    forbidden: [],
  },
  { email: demo.clientNorth, role: 'client', shot: 'nav-client-north', links: ['Outlook', 'Passes', 'Corrections'], exact: true, forbidden: [] },
  { email: demo.clientSouth, role: 'client', shot: 'nav-client-south', links: ['Outlook', 'Passes', 'Corrections'], exact: true, forbidden: [] },
]

describe('sign-in and navigation by role', { timeout: 120_000 }, () => {
  it('shows the safety caution and the forgotten-password link at sign-in', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/`)
    // Signed out: the start page sends the visitor to sign-in, remembering where they were going.
    await page.getByRole('heading', { name: 'Sign in' }).waitFor()
    expect(new URL(page.url()).pathname).toBe('/sign-in')
    expect(await page.title()).toBe('Sign in · Skyfurrow')
    await expect(page.getByTestId('safety-caution').textContent()).resolves.toContain(
      'Auto-steer must be supervised. Drainage grades and levelling designs must be checked against local codes and by licensed practitioners.',
    )
    expect(await page.getByRole('link', { name: 'Forgot your password?' }).isVisible()).toBe(true)
    await screenshot(page, 'sign-in')
  })

  it('refuses a wrong password with a message on the form', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/sign-in`)
    await page.getByLabel('E-mail').fill(demo.office)
    await page.getByLabel('Password', { exact: true }).fill('not-the-password')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.getByTestId('sign-in-error').waitFor()
    expect(await page.getByTestId('sign-in-error').textContent()).toMatch(/not correct/i)
    expect(new URL(page.url()).pathname).toBe('/sign-in')
  })

  for (const account of expected) {
    it(`${account.email} (${account.role}) sees ${account.exact ? 'exactly ' : ''}${account.links.join(', ')}`, async () => {
      const { page } = browser
      await signIn(page, server.baseUrl, account.email)
      expect(new URL(page.url()).pathname).toBe('/outlook')
      const labels = await navigationLabels(page)
      if (account.exact) {
        expect(labels).toEqual(account.links)
      } else {
        expect(labels.filter((label) => account.links.includes(label))).toEqual(account.links)
        for (const label of account.forbidden) expect(labels).not.toContain(label)
      }
      const me = await apiFromPage(page, '/api/auth/me')
      expect(me.status).toBe(200)
      expect((me.body as SessionUser).role).toBe(account.role)
      await page.getByRole('heading', { name: 'Outlook', level: 1 }).waitFor()
      await screenshot(page, account.shot)
      await signOut(page)
      expect(await apiFromPage(page, '/api/auth/me').then((r) => r.status)).toBe(401)
    })
  }

  it('sends a signed-out visitor back to the page they asked for after sign-in', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/passes`)
    await page.getByRole('heading', { name: 'Sign in' }).waitFor()
    expect(new URL(page.url()).searchParams.get('next')).toBe('/passes')
    await page.getByLabel('E-mail').fill(demo.contractor)
    await page.getByLabel('Password', { exact: true }).fill('skyfurrow-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.getByRole('heading', { name: 'Passes', level: 1 }).waitFor()
    expect(new URL(page.url()).pathname).toBe('/passes')
    expect(await page.title()).toBe('Passes · Skyfurrow')
    await signOut(page)
  })
})

describe('a farm client stays within their own farms', { timeout: 120_000 }, () => {
  it('cannot open another farm by URL or API, nor pages for other roles', async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.clientSouth)
    const south = (await apiFromPage(page, '/api/auth/me')).body as SessionUser
    expect(south.farmIds.length).toBeGreaterThan(0)
    await signOut(page)

    await signIn(page, server.baseUrl, demo.clientNorth)
    const north = (await apiFromPage(page, '/api/auth/me')).body as SessionUser
    expect(north.farmIds.length).toBeGreaterThan(0)
    const foreign = south.farmIds.find((id) => !north.farmIds.includes(id))
    expect(foreign, 'the two demo clients share no farm').toBeDefined()

    // Their own farm opens.
    await page.goto(`${server.baseUrl}/farms/${north.farmIds[0]}`)
    await page.getByRole('heading', { name: 'Farm details' }).waitFor()
    await screenshot(page, 'client-own-farm')

    // Another client's farm does not, by URL ...
    await page.goto(`${server.baseUrl}/farms/${foreign}`)
    await page.getByTestId('farm-not-found').waitFor()
    await screenshot(page, 'client-foreign-farm')
    // ... nor by API, and the farm list holds only their own farms.
    expect([403, 404]).toContain((await apiFromPage(page, `/api/farms/${foreign}`)).status)
    const list = await apiFromPage(page, '/api/farms?pageSize=200')
    expect(list.status).toBe(200)
    const ids = (list.body as { items: { id: number }[] }).items.map((f) => f.id).sort()
    expect(ids).toEqual([...north.farmIds].sort())

    // Pages for other roles answer "not part of your account"; their APIs refuse.
    await page.goto(`${server.baseUrl}/admin/users`)
    await page.getByTestId('not-allowed').waitFor()
    expect(await page.getByTestId('not-allowed').textContent()).toContain('/admin/users')
    expect((await apiFromPage(page, '/api/users')).status).toBe(403)
    await page.goto(`${server.baseUrl}/mailbox`)
    await page.getByTestId('not-allowed').waitFor()
    expect((await apiFromPage(page, '/api/mailbox')).status).toBe(403)

    // An unknown address shows the 404 page inside the app.
    await page.goto(`${server.baseUrl}/no-such-page`)
    await page.getByTestId('not-found').waitFor()
    expect(await page.title()).toBe('Page not found · Skyfurrow')
    await signOut(page)
  })

  it('shows a farm client a phone-sized page they can read', async () => {
    const { page } = browser
    await page.setViewportSize({ width: 390, height: 844 })
    try {
      await signIn(page, server.baseUrl, demo.clientNorth)
      const me = (await apiFromPage(page, '/api/auth/me')).body as SessionUser
      await page.getByRole('heading', { name: 'Outlook', level: 1 }).waitFor()
      await screenshot(page, 'phone-client-outlook')
      // The navigation slides in from the menu button on a phone.
      const nav = page.getByRole('navigation', { name: 'Main navigation' })
      expect(await nav.isVisible()).toBe(false)
      await page.getByRole('button', { name: 'Menu', exact: true }).click()
      await nav.waitFor()
      await screenshot(page, 'phone-client-menu')
      await nav.getByRole('link', { name: /Passes/ }).click()
      await page.getByRole('heading', { name: 'Passes', level: 1 }).waitFor()
      // Choosing a page closes the panel again.
      await nav.waitFor({ state: 'hidden' })
      await screenshot(page, 'phone-client-passes')
      // The farm page and the account page fit the screen: no sideways scrolling on a phone.
      await page.goto(`${server.baseUrl}/farms/${me.farmIds[0]}`)
      await page.getByRole('heading', { name: 'Farm details' }).waitFor()
      await screenshot(page, 'phone-client-farm')
      expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
      await page.goto(`${server.baseUrl}/account`)
      await page.getByRole('heading', { name: 'Your account', level: 1 }).waitFor()
      // The account page lists the client's own farms, and only those.
      await page.getByTestId('farm-cards').waitFor()
      expect(await page.getByTestId('farm-cards').locator('li').count()).toBe(me.farmIds.length)
      await screenshot(page, 'phone-client-account')
      expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0)
      await signOut(page)
    } finally {
      await page.setViewportSize({ width: 1280, height: 800 })
    }
  })
})

describe('the About page', { timeout: 120_000 }, () => {
  it('carries the safety caution word for word, signed out too', async () => {
    const { page } = browser
    await page.goto(`${server.baseUrl}/about`)
    const caution = page.getByRole('complementary', { name: 'Safety caution' })
    await caution.waitFor()
    expect((await caution.getByTestId('safety-caution').textContent())?.trim()).toBe(
      'Forecasts cover satellite geometry and the obstructions that were drawn. They do not cover multipath, ' +
        'ionospheric storms, correction-link outages, receiver faults or unmapped obstacles. Auto-steer must be ' +
        'supervised. Drainage grades and levelling designs must be checked against local codes and by licensed ' +
        'practitioners.',
    )
    await screenshot(page, 'about-signed-out')
  })
})
