// The content security policy the server sends is one the app really works under: every
// page of an admin and of a client loads, draws its content (map, charts, tables) and
// raises no CSP violation (securitypolicyviolation events and console errors are watched).
// The Users page shows the audit log of admin actions.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demo, screenshot, settled, signIn, signOut, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

let server: RunningServer
let browser: RunningBrowser
const consoleErrors: string[] = []

beforeAll(async () => {
  server = await startServer()
  browser = await startBrowser()
  // Collected inside every page from its first script on.
  await browser.context.addInitScript(() => {
    const w = window as unknown as { __cspViolations: string[] }
    w.__cspViolations = []
    document.addEventListener('securitypolicyviolation', (e) => {
      w.__cspViolations.push(`${e.violatedDirective} blocked ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber}`)
    })
  })
  browser.page.on('console', (m) => {
    if (m.type() === 'error') consoleErrors.push(m.text())
  })
})

afterAll(async () => {
  await browser?.close()
  await server?.stop()
})

async function violations(): Promise<string[]> {
  return browser.page.evaluate(() => (window as unknown as { __cspViolations?: string[] }).__cspViolations ?? [])
}

async function visit(path: string): Promise<string[]> {
  const { page } = browser
  await page.goto(`${server.baseUrl}${path}`)
  await page.locator('main').first().waitFor()
  await settled(page)
  // Give map tiles, charts and lazy chunks a moment to run their code (waits on a state:
  // the network going quiet).
  await page.waitForLoadState('networkidle')
  return violations()
}

describe('content security policy in the browser', () => {
  it('the server sends the policy on pages', async () => {
    const res = await fetch(`${server.baseUrl}/outlook`)
    expect(res.headers.get('content-security-policy')).toContain("script-src 'self'")
  })

  it('every admin page loads and works with no CSP violation', { timeout: 240_000 }, async () => {
    const { page } = browser
    await signIn(page, server.baseUrl, demo.admin)
    const paths = ['/outlook', '/fields', '/passes', '/plans', '/orbits', '/admin/farms', '/admin/users', '/admin/work-types', '/admin/service-levels', '/admin/machines', '/jobs', '/mailbox', '/account', '/about']
    const found: string[] = []
    for (const path of paths) {
      for (const v of await visit(path)) found.push(`${path}: ${v}`)
      expect(await page.locator('h1').first().textContent(), path).toBeTruthy()
    }
    // The Users page has its audit section.
    await visit('/admin/users')
    await page.getByRole('heading', { name: 'Admin actions' }).waitFor()
    await page.getByTestId('audit-table').waitFor()
    await screenshot(page, 'admin-users-audit')
    // The map draws into a canvas (OpenLayers) under the policy.
    await visit('/fields')
    expect(await page.locator('canvas').count()).toBeGreaterThan(0)
    expect(found).toEqual([])
    expect(consoleErrors.filter((e) => /Content Security Policy|Refused to/i.test(e))).toEqual([])
    await signOut(page)
  })

  it('a client\'s pages load with no CSP violation', { timeout: 120_000 }, async () => {
    const { page } = browser
    await browser.context.clearCookies()
    await signIn(page, server.baseUrl, demo.clientNorth)
    const found: string[] = []
    for (const path of ['/outlook', '/passes', '/account']) for (const v of await visit(path)) found.push(`${path}: ${v}`)
    expect(found).toEqual([])
    expect(consoleErrors.filter((e) => /Content Security Policy|Refused to/i.test(e))).toEqual([])
  })
})
