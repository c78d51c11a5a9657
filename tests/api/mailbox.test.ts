// The Mailbox: what the local fake SMTP server received, for admin and office staff.
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createLogger } from '../../server/logger.ts'
import { startFakeSmtp } from '../../server/mail/fake-smtp.ts'
import { createMailer } from '../../server/mail/transport.ts'
import { Client, demo, signIn, startTestServer, unique, waitForMail, type TestServer } from '../support/server.ts'

let server: TestServer
let office: Client
let messageId: number
let subject: string
const recipient = `${unique('mb')}@example.test`

beforeAll(async () => {
  server = await startTestServer()
  office = await signIn(server.app, demo.office)
  subject = `Weekly plan ${unique()}`
  const since = new Date()
  await server.mailer.send({
    to: recipient,
    subject,
    text: 'Plain text body',
    html: '<p>HTML <b>body</b></p>',
    attachments: [
      { filename: 'passes.ics', content: 'BEGIN:VCALENDAR\r\nEND:VCALENDAR\r\n', contentType: 'text/calendar' },
      { filename: 'note.txt', content: Buffer.from('second file'), contentType: 'text/plain' },
    ],
  })
  messageId = (await waitForMail(server.repos, recipient, since)).id
})
afterAll(async () => {
  await server?.close()
})

describe('mailbox', () => {
  it('lists received messages, newest first, with search', async () => {
    const res = await office.get(`/api/mailbox?q=${encodeURIComponent(recipient)}`)
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(1)
    expect(res.body.items[0]).toEqual({
      id: messageId,
      from: expect.stringContaining('<plans@skyfurrow.test>'),
      to: recipient,
      subject,
      receivedAt: expect.any(String),
      hasAttachments: true,
    })
    const all = await office.get('/api/mailbox?pageSize=50')
    const times = all.body.items.map((m: { receivedAt: string }) => Date.parse(m.receivedAt))
    expect(times).toEqual([...times].sort((a, b) => b - a))
  })

  it('shows one message with its text, HTML and attachment list', async () => {
    const res = await office.get(`/api/mailbox/${messageId}`)
    expect(res.status).toBe(200)
    expect(res.body.text.trim()).toBe('Plain text body')
    expect(res.body.html).toContain('<b>body</b>')
    expect(res.body.attachments).toEqual([
      { filename: 'passes.ics', contentType: 'text/calendar', size: expect.any(Number) },
      { filename: 'note.txt', contentType: 'text/plain', size: 11 },
    ])
  })

  it('downloads an attachment as a file', async () => {
    const res = await office.get(`/api/mailbox/${messageId}/attachments/1`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toContain('text/plain')
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?note\.txt"?$/)
    expect(res.text).toBe('second file')
    expect((await office.get(`/api/mailbox/${messageId}/attachments/5`)).status).toBe(404)
    expect((await office.get('/api/mailbox/999999')).status).toBe(404)
  })

  it('is for admin and office only', async () => {
    expect((await request(server.app).get('/api/mailbox')).status).toBe(401)
    const crew = await signIn(server.app, demo.contractor)
    expect((await crew.get('/api/mailbox')).status).toBe(403)
    const admin = await signIn(server.app, demo.admin)
    expect((await admin.get('/api/mailbox')).status).toBe(200)
  })

  it('answers 404 when mail goes to a real SMTP server', async () => {
    const real = { fake: false, send: async () => {}, close: () => {} }
    const app = server.appWith({ smtpUrl: 'smtp://mail.example.test:587' }, { mailer: real })
    const admin = await signIn(app, demo.admin)
    const res = await admin.get('/api/mailbox')
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('mailbox_off')
    expect((await request(app).get('/api/meta')).body.fakeMailbox).toBe(false)
  })

  it('sends through SMTP_URL when one is configured', async () => {
    // Any SMTP server will do; here a second local one stands in for the real relay.
    const relay = await startFakeSmtp({ port: 0, mailbox: server.repos.mailbox, logger: createLogger('error') })
    const mailer = createMailer({ from: 'Skyfurrow <plans@skyfurrow.test>', smtpUrl: `smtp://127.0.0.1:${relay.port}` })
    try {
      expect(mailer.fake).toBe(false)
      const to = `${unique('relay')}@example.test`
      const since = new Date()
      await mailer.send({ to, subject: 'Through the relay', text: 'hello', html: '<p>hello</p>' })
      expect((await waitForMail(server.repos, to, since)).subject).toBe('Through the relay')
    } finally {
      mailer.close()
      await relay.close()
    }
  })
})
