// Password reset and invitation links: e-mailed through the local fake SMTP server (read
// back from the mailbox table), one-time, hashed at rest, expiring.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { hashLinkToken } from '../../server/auth/password.ts'
import { authTokens } from '../../server/db/schema.ts'
import {
  Client,
  createUserWithPassword,
  demo,
  linkToken,
  signIn,
  startTestServer,
  TEST_PUBLIC_URL,
  unique,
  waitForMail,
  type TestServer,
} from '../support/server.ts'

let server: TestServer
let admin: Client

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
})
afterAll(async () => {
  await server?.close()
})

const anon = () => new Client(server.app)

describe('password reset', () => {
  it('e-mails a one-time link that sets a new password and ends every session', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const session = await signIn(server.app, user.email, user.password)
    const since = new Date()
    const res = await anon().post('/api/auth/request-reset', { email: user.email.toUpperCase() })
    expect(res.status).toBe(202)

    const mail = await waitForMail(server.repos, user.email, since)
    expect(mail.subject).toBe('Reset your Skyfurrow password')
    expect(mail.htmlBody).toContain('Choose a new password')
    const { token, url } = linkToken(mail.textBody)
    expect(`${url.origin}${url.pathname}`).toBe(`${TEST_PUBLIC_URL}/reset-password`)
    expect(url.searchParams.has('invite')).toBe(false)

    // Only a hash of the token is stored.
    const [row] = await server.database.db.select().from(authTokens).where(eq(authTokens.tokenHash, hashLinkToken(token)))
    expect(row).toMatchObject({ userId: user.id, purpose: 'reset', usedAt: null })
    const stored = await server.database.db.select().from(authTokens).where(eq(authTokens.userId, user.id))
    expect(JSON.stringify(stored)).not.toContain(token)
    // Expires in one hour.
    expect(row.expiresAt.getTime() - Date.now()).toBeGreaterThan(59 * 60_000)
    expect(row.expiresAt.getTime() - Date.now()).toBeLessThanOrEqual(60 * 60_000)

    expect((await anon().post('/api/auth/reset', { token, password: 'a-fresh-password' })).status).toBe(204)
    expect((await session.get('/api/auth/me')).status).toBe(401)
    await signIn(server.app, user.email, 'a-fresh-password')

    const again = await anon().post('/api/auth/reset', { token, password: 'another-password' })
    expect(again.status).toBe(400)
    expect(again.body.error.fields.token).toMatch(/expired or was already used/)
  })

  it('answers 202 for unknown and deactivated addresses but sends nothing', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    await server.repos.users.update(user.id, { active: false })
    const since = new Date()
    for (const email of ['nobody-here@example.test', user.email]) {
      const res = await anon().post('/api/auth/request-reset', { email })
      expect(res.status).toBe(202)
    }
    // A later mail to a real address arrives; the earlier ones never do.
    const control = await createUserWithPassword(server, { role: 'office' })
    await anon().post('/api/auth/request-reset', { email: control.email })
    await waitForMail(server.repos, control.email, since)
    await expect(waitForMail(server.repos, user.email, since, 300)).rejects.toThrow(/no e-mail/)
    await expect(waitForMail(server.repos, 'nobody-here@example.test', since, 300)).rejects.toThrow(/no e-mail/)
  })

  it('refuses an expired link', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    const since = new Date()
    await anon().post('/api/auth/request-reset', { email: user.email })
    const { token } = linkToken((await waitForMail(server.repos, user.email, since)).textBody)
    await server.database.db
      .update(authTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(authTokens.tokenHash, hashLinkToken(token)))
    const res = await anon().post('/api/auth/reset', { token, password: 'a-fresh-password' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.token).toBeTruthy()
    await signIn(server.app, user.email, user.password)
  })

  it('only the newest reset link of a user works', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    const since = new Date()
    await anon().post('/api/auth/request-reset', { email: user.email })
    const first = linkToken((await waitForMail(server.repos, user.email, since)).textBody).token
    const since2 = new Date(Date.now() + 1000)
    await new Promise((r) => setTimeout(r, 1100))
    await anon().post('/api/auth/request-reset', { email: user.email })
    const second = linkToken((await waitForMail(server.repos, user.email, since2)).textBody).token
    expect(second).not.toBe(first)
    expect((await anon().post('/api/auth/reset', { token: first, password: 'a-fresh-password' })).status).toBe(400)
    expect((await anon().post('/api/auth/reset', { token: second, password: 'a-fresh-password' })).status).toBe(204)
  })

  it('names the fields of a malformed reset', async () => {
    const res = await anon().post('/api/auth/reset', { token: 'short', password: 'short' })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['password', 'token'])
    const bad = await anon().post('/api/auth/request-reset', { email: 'not an address' })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.email).toBe('Enter a valid e-mail address')
  })
})

describe('invitations', () => {
  it('creates a user without a password, e-mails a set-password link, and the link completes the account', async () => {
    const email = `${unique('invitee')}@example.test`
    const since = new Date()
    const res = await admin.post('/api/users', { email, name: 'Ines Invited', role: 'contractor' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ email, name: 'Ines Invited', role: 'contractor', active: true, passwordSet: false })

    const mail = await waitForMail(server.repos, email, since)
    expect(mail.subject).toMatch(/invited you to Skyfurrow/)
    expect(mail.textBody).toContain('Ines Invited')
    expect(mail.htmlBody).toContain('Set your password')
    const { token, url } = linkToken(mail.textBody)
    expect(`${url.origin}${url.pathname}`).toBe(`${TEST_PUBLIC_URL}/reset-password`)
    expect(url.searchParams.get('invite')).toBe('1')

    const [row] = await server.database.db.select().from(authTokens).where(eq(authTokens.tokenHash, hashLinkToken(token)))
    expect(row.purpose).toBe('invite')
    const days = (row.expiresAt.getTime() - Date.now()) / 86_400_000
    expect(days).toBeGreaterThan(6.99)
    expect(days).toBeLessThanOrEqual(7)

    // Cannot sign in before setting the password.
    expect((await anon().post('/api/auth/sign-in', { email, password: 'whatever-password' })).status).toBe(401)
    expect((await anon().post('/api/auth/reset', { token, password: 'my-own-password' })).status).toBe(204)
    const invitee = await signIn(server.app, email, 'my-own-password')
    expect((await invitee.get('/api/auth/me')).body.role).toBe('contractor')
    expect((await admin.get(`/api/users/${res.body.id}`)).body.passwordSet).toBe(true)
    expect((await anon().post('/api/auth/reset', { token, password: 'my-other-password' })).status).toBe(400)
  })

  it('re-sends an invitation: a new link, and the old one stops working', async () => {
    const email = `${unique('invitee')}@example.test`
    const since = new Date()
    const created = await admin.post('/api/users', { email, name: 'Otto Twice', role: 'office' })
    const first = linkToken((await waitForMail(server.repos, email, since)).textBody).token
    await new Promise((r) => setTimeout(r, 1100))
    const since2 = new Date()
    expect((await admin.post(`/api/users/${created.body.id}/resend-invite`)).status).toBe(204)
    const second = linkToken((await waitForMail(server.repos, email, since2)).textBody).token
    expect(second).not.toBe(first)
    expect((await anon().post('/api/auth/reset', { token: first, password: 'my-own-password' })).status).toBe(400)
    expect((await anon().post('/api/auth/reset', { token: second, password: 'my-own-password' })).status).toBe(204)
    // Once the password is set there is nothing to re-send.
    const res = await admin.post(`/api/users/${created.body.id}/resend-invite`)
    expect(res.status).toBe(409)
  })

  it('refuses a second user with the same e-mail (409 naming the field)', async () => {
    const res = await admin.post('/api/users', { email: demo.office.toUpperCase(), name: 'Copy', role: 'office' })
    expect(res.status).toBe(409)
    expect(res.body.error.fields.email).toMatch(/already exists/)
  })

  it('keeps nothing when the invitation cannot be sent', async () => {
    const failing = {
      fake: true,
      send: async () => {
        throw new Error('SMTP refused')
      },
      close: () => {},
    }
    const app = server.appWith({}, { mailer: failing })
    const adminHere = await signIn(app, demo.admin)
    const email = `${unique('lost')}@example.test`
    const res = await adminHere.post('/api/users', { email, name: 'Never Saved', role: 'office' })
    expect(res.status).toBe(502)
    expect(res.body.error.code).toBe('mail_failed')
    expect(await server.repos.users.findByEmail(email)).toBeNull()
  })
})
