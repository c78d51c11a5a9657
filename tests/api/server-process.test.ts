// `tsx server/index.ts` as a process: listens on HOST:PORT with the announced line, runs the
// local mailbox, serves the API, and on SIGTERM / SIGINT stops cleanly with exit code 0.
import { spawn } from 'node:child_process'
import { createConnection } from 'node:net'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { testConfig } from '../support/server.ts'

const root = fileURLToPath(new URL('../..', import.meta.url))

function startServer() {
  const { databaseUrl } = testConfig()
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      HOST: '127.0.0.1',
      PORT: '0',
      FAKE_SMTP_PORT: '0',
      SMTP_URL: '',
      PUBLIC_URL: '',
      LOG_LEVEL: 'info',
      DATABASE_URL: databaseUrl,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let output = ''
  child.stdout.on('data', (c: Buffer) => (output += c.toString()))
  child.stderr.on('data', (c: Buffer) => (output += c.toString()))
  const exited = new Promise<number | null>((done) => child.once('exit', (code) => done(code)))
  const listening = (async () => {
    const deadline = Date.now() + 90_000
    for (;;) {
      const m = /Skyfurrow listening on (http:\/\/127\.0\.0\.1:(\d+))/.exec(output)
      if (m) return { url: m[1], output: () => output }
      if (child.exitCode !== null) throw new Error(`the server exited early:\n${output}`)
      if (Date.now() > deadline) throw new Error(`the server did not start:\n${output}`)
      await new Promise((r) => setTimeout(r, 100))
    }
  })()
  return { child, exited, listening, output: () => output }
}

const portOpen = (port: number) =>
  new Promise<boolean>((done) => {
    const socket = createConnection({ host: '127.0.0.1', port })
    socket.once('connect', () => (socket.destroy(), done(true)))
    socket.once('error', () => done(false))
  })

describe('the server process', () => {
  for (const signal of ['SIGTERM', 'SIGINT'] as const) {
    it(`starts, serves the API and stops cleanly on ${signal}`, { timeout: 150_000 }, async () => {
      const server = startServer()
      try {
        const { url } = await server.listening
        const health = await fetch(`${url}/api/health`)
        expect(health.status).toBe(200)
        expect(await health.json()).toEqual({ status: 'ok', database: 'ok' })
        const meta = await (await fetch(`${url}/api/meta`)).json()
        expect(meta.fakeMailbox).toBe(true)
        const smtpPort = Number(/local mailbox \(fake SMTP\) on 127\.0\.0\.1:(\d+)/.exec(server.output())?.[1])
        expect(await portOpen(smtpPort)).toBe(true)

        server.child.kill(signal)
        expect(await server.exited, server.output()).toBe(0)
        expect(server.output()).toContain(`${signal} received`)
        expect(await portOpen(Number(new URL(url).port))).toBe(false)
        expect(await portOpen(smtpPort)).toBe(false)
      } finally {
        if (server.child.exitCode === null) server.child.kill('SIGKILL')
      }
    })
  }

  it('refuses to start without DATABASE_URL, naming it', { timeout: 60_000 }, async () => {
    const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
      cwd: root,
      env: { PATH: process.env.PATH ?? '', PORT: '0', FAKE_SMTP_PORT: '0' },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let output = ''
    child.stderr.on('data', (c: Buffer) => (output += c.toString()))
    const code = await new Promise<number | null>((done) => child.once('exit', done))
    expect(code).toBe(1)
    expect(output).toContain('DATABASE_URL')
  })
})
