// Browser-test support: starts the real server (API + built client) on a free port against
// the test database, and a headless Debian chromium driven by playwright-core.
//
// It builds nothing: run `npx vite build` first so that dist/ holds the client, and set
// DATABASE_URL to a migrated and seeded database (`npm test` does both).
import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'
import type { FarmForecastResponse } from '@shared/schemas/forecast'

export const root = resolve(import.meta.dirname, '..', '..')
export const artifactsDir = join(root, 'tests', '.artifacts')
export const demoPassword = 'skyfurrow-demo'

export const demo = {
  admin: 'admin@demo.skyfurrow.test',
  office: 'office@demo.skyfurrow.test',
  contractor: 'crew@demo.skyfurrow.test',
  clientNorth: 'client.north@demo.skyfurrow.test',
  clientSouth: 'client.south@demo.skyfurrow.test',
} as const

/** A port nobody listens on right now. */
export async function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const probe = createServer()
    probe.once('error', reject)
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address()
      const port = typeof address === 'object' && address ? address.port : 0
      probe.close(() => resolvePort(port))
    })
  })
}

export interface RunningServer {
  baseUrl: string
  /** Everything the server printed, for failure messages. */
  log: () => string
  stop: () => Promise<void>
}

/** Starts `tsx server/index.ts` and waits until GET /api/health answers 200. */
export async function startServer(): Promise<RunningServer> {
  const databaseUrl = process.env.DATABASE_URL
  if (!databaseUrl) throw new Error('Browser tests need DATABASE_URL (a migrated, seeded test database); `npm test` sets it.')
  if (!existsSync(join(root, 'dist', 'index.html'))) {
    throw new Error('Browser tests need the built client in dist/: run `npx vite build` first.')
  }
  const port = await freePort()
  const baseUrl = `http://127.0.0.1:${port}`
  let output = ''
  const child: ChildProcess = spawn(join(root, 'node_modules', '.bin', 'tsx'), ['server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: String(port),
      HOST: '127.0.0.1',
      FAKE_SMTP_PORT: '0',
      DATABASE_URL: databaseUrl,
      SMTP_URL: '',
      PUBLIC_URL: '',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  child.stdout?.on('data', (chunk: Buffer) => (output += chunk.toString()))
  child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()))
  const exited = new Promise<number | null>((done) => child.once('exit', (code) => done(code)))

  const deadline = Date.now() + 60_000
  for (;;) {
    if (child.exitCode !== null) throw new Error(`The server exited with ${child.exitCode}:\n${output}`)
    try {
      const response = await fetch(`${baseUrl}/api/health`)
      if (response.ok) break
    } catch {
      // Not listening yet.
    }
    if (Date.now() > deadline) {
      child.kill('SIGKILL')
      throw new Error(`The server did not become healthy within 60 s:\n${output}`)
    }
    await new Promise((r) => setTimeout(r, 200))
  }

  return {
    baseUrl,
    log: () => output,
    stop: async () => {
      if (child.exitCode !== null) return
      child.kill('SIGTERM')
      const timer = setTimeout(() => child.kill('SIGKILL'), 10_000)
      await exited
      clearTimeout(timer)
    },
  }
}

export interface RunningBrowser {
  context: BrowserContext
  page: Page
  close: () => Promise<void>
}

/** Debian's chromium, headless, with a throw-away profile. */
export async function startBrowser(): Promise<RunningBrowser> {
  const profile = mkdtempSync(join(tmpdir(), 'skyfurrow-e2e-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    viewport: { width: 1280, height: 800 },
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  })
  // Generous: the browser tests share the machine with builds and other test runs.
  context.setDefaultTimeout(30_000)
  const page = context.pages()[0] ?? (await context.newPage())
  return {
    context,
    page,
    close: async () => {
      await context.close()
      rmSync(profile, { recursive: true, force: true })
    },
  }
}

/** Waits until no table or panel shows its loading spinner. */
export async function settled(page: Page): Promise<void> {
  const deadline = Date.now() + 30_000
  while ((await page.locator('.ant-spin-spinning').count()) > 0) {
    if (Date.now() > deadline) throw new Error('The page kept loading for 30 s')
    await page.waitForTimeout(100)
  }
}

/** Saves a full-page screenshot as tests/.artifacts/<name>.png (git-ignored) for people to look at. */
export async function screenshot(page: Page, name: string): Promise<void> {
  mkdirSync(artifactsDir, { recursive: true })
  await settled(page)
  await page.screenshot({ path: join(artifactsDir, `${name}.png`), fullPage: true })
}

/** Signs in through the sign-in page and waits for the start page. */
export async function signIn(page: Page, baseUrl: string, email: string, password = demoPassword): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`)
  await page.getByLabel('E-mail', { exact: true }).fill(email)
  await page.getByLabel('Password', { exact: true }).fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  // The start page has been reached (a click before the redirect lands would be undone by
  // it); the user menu shows on every screen size (on a phone the navigation waits behind "Menu").
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'))
  await page.getByTestId('user-menu').waitFor()
}

/** Signs out through the user menu and waits for the sign-in page. */
export async function signOut(page: Page): Promise<void> {
  await page.getByTestId('user-menu').click()
  await page.getByRole('menuitem', { name: 'Sign out', exact: true }).click()
  await page.getByRole('heading', { name: 'Sign in' }).waitFor()
}

/** The link texts of the main navigation, in order. */
export async function navigationLabels(page: Page): Promise<string[]> {
  const nav = page.locator('nav[aria-label="Main navigation"]')
  return (await nav.locator('a .label').allTextContents()).map((t) => t.trim())
}

/** Calls the API from inside the page (with its session cookie); returns status and body. */
export async function apiFromPage(page: Page, path: string): Promise<{ status: number; body: unknown }> {
  return page.evaluate(async (url) => {
    const response = await fetch(url, { credentials: 'same-origin', headers: { Accept: 'application/json' } })
    let body: unknown = null
    try {
      body = await response.json()
    } catch {
      body = null
    }
    return { status: response.status, body }
  }, path)
}

/** POST from inside the page (session cookie and same origin), JSON in and out. */
export async function postFromPage(page: Page, path: string, body: unknown = {}): Promise<{ status: number; body: unknown }> {
  return page.evaluate(
    async ([url, payload]) => {
      const response = await fetch(url as string, {
        method: 'POST',
        credentials: 'same-origin',
        headers: { 'Content-Type': 'application/json', Accept: 'application/json' },
        body: JSON.stringify(payload),
      })
      let json: unknown = null
      try {
        json = await response.json()
      } catch {
        json = null
      }
      return { status: response.status, body: json }
    },
    [path, body] as const,
  )
}

/**
 * Waits until the field's week is stored and no recompute of it is pending. The server's
 * start-up sweep queues every field whose stored week is missing or stale, behind
 * whatever earlier test files left; when the field has no job of its own, this asks for
 * one (signed in as a role that may).
 */
export async function waitForForecast(page: Page, server: RunningServer, farmId: number, fieldId: number): Promise<FarmForecastResponse> {
  const deadline = Date.now() + 240_000
  let asked = false
  for (;;) {
    const { status, body } = await apiFromPage(page, `/api/farms/${farmId}/forecast`)
    if (status !== 200) throw new Error(`GET /api/farms/${farmId}/forecast answered ${status}`)
    const farm = body as FarmForecastResponse
    const field = farm.fields.find((f) => f.fieldId === fieldId)
    if (field && field.hours.length >= 24 * 6 && !field.pendingJob) return farm
    if (!asked && field && !field.pendingJob) {
      const queued = await postFromPage(page, `/api/fields/${fieldId}/recompute`)
      if (queued.status !== 202) throw new Error(`POST /api/fields/${fieldId}/recompute answered ${queued.status}`)
      asked = true
    }
    if (Date.now() > deadline) throw new Error(`No stored forecast for field ${fieldId} after 4 minutes:\n${server.log().slice(-2000)}`)
    await page.waitForTimeout(2000)
  }
}
