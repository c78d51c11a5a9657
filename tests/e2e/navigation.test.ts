// Moving between pages in a browser: a click on another page while the current one is
// still loading is not undone when that page finishes loading and settles its address
// (the Outlook writes its default farm into the address once the farm list arrives).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { demo, signIn, startBrowser, startServer, type RunningBrowser, type RunningServer } from './support'

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

/** A gate a request waits at until `open()`; `asked` says the request has come. */
function gate() {
  let open!: () => void
  const opened = new Promise<void>((resolve) => (open = resolve))
  const state = { asked: false, open, opened }
  return state
}

describe('navigation while a page loads', { timeout: 120_000 }, () => {
  it('a click on Passes while the Outlook waits for its farms lands on Passes', async () => {
    const { page } = browser
    const farms = gate()
    const passesCode = gate()
    // Hold the farm list (the Outlook's first load) and the Passes page's code, so that the
    // farms arrive while the navigation to Passes is under way.
    await page.route(/\/api\/farms(\?|$)/, async (route) => {
      farms.asked = true
      await farms.opened
      await route.continue()
    })
    await page.route(/\/assets\/PassesView-[^/]*\.js$/, async (route) => {
      passesCode.asked = true
      await passesCode.opened
      await route.continue()
    })
    try {
      await signIn(page, server.baseUrl, demo.office)
      await expect.poll(() => farms.asked).toBe(true)
      await page.getByRole('navigation', { name: 'Main navigation' }).getByRole('link', { name: /Passes/ }).click()
      await expect.poll(() => passesCode.asked).toBe(true)

      // The farms arrive and the Outlook has handled them (the page has drawn since).
      const farmsResponse = page.waitForResponse(/\/api\/farms(\?|$)/)
      farms.open()
      await (await farmsResponse).finished()
      await page.evaluate(() => new Promise((resolve) => requestAnimationFrame(() => requestAnimationFrame(resolve))))

      passesCode.open()
      await page.getByRole('heading', { name: 'Passes', level: 1 }).waitFor()
      expect(new URL(page.url()).pathname).toBe('/passes')
    } finally {
      farms.open()
      passesCode.open()
      await page.unrouteAll({ behavior: 'wait' })
    }
  })
})
