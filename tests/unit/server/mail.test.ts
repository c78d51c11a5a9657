import { describe, expect, it } from 'vitest'
import { parseForMailbox } from '../../../server/mail/fake-smtp.ts'
import { escapeHtml, inviteMail, resetMail } from '../../../server/mail/templates.ts'

describe('mail templates', () => {
  it('escape names in HTML and carry the link in both parts', () => {
    const mail = inviteMail({
      to: 'x@example.test',
      name: '<script>alert(1)</script>',
      businessName: 'Ridge & Sons',
      invitedBy: 'Admin',
      link: 'https://plans.example.test/reset-password?token=abc&invite=1',
      expiresInDays: 7,
    })
    expect(mail.html).not.toContain('<script>')
    expect(mail.html).toContain('&lt;script&gt;')
    expect(mail.html).toContain('Ridge &amp; Sons')
    expect(mail.html).toContain('token=abc&amp;invite=1')
    expect(mail.text).toContain('https://plans.example.test/reset-password?token=abc&invite=1')
    expect(mail.subject).toBe('Ridge & Sons invited you to Skyfurrow')
    expect(mail.text).toContain('7 days')
  })

  it('reset mail states the expiry', () => {
    const mail = resetMail({ to: 'x@example.test', name: 'Pat', link: 'https://p.test/reset-password?token=t', expiresInMinutes: 60 })
    expect(mail.text).toContain('60 minutes')
    expect(mail.html).toContain('https://p.test/reset-password?token=t')
  })

  it('escapeHtml covers the five special characters', () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;')
  })
})

describe('parseForMailbox', () => {
  it('reads addresses, subject, bodies and attachments from a raw message', async () => {
    const raw = Buffer.from(
      [
        'From: Skyfurrow <plans@skyfurrow.test>',
        'To: Ana <ana@example.test>, ben@example.test',
        'Cc: cy@example.test',
        'Subject: =?UTF-8?Q?Wochenplan_f=C3=BCr_Hof?=',
        'Message-ID: <m1@skyfurrow.test>',
        'MIME-Version: 1.0',
        'Content-Type: multipart/mixed; boundary="b1"',
        '',
        '--b1',
        'Content-Type: text/plain; charset=utf-8',
        '',
        'Hello',
        '--b1',
        'Content-Type: text/calendar; name="plan.ics"',
        'Content-Disposition: attachment; filename="plan.ics"',
        '',
        'BEGIN:VCALENDAR',
        'END:VCALENDAR',
        '--b1--',
        '',
      ].join('\r\n'),
    )
    const row = await parseForMailbox(raw)
    expect(row.subject).toBe('Wochenplan für Hof')
    expect(row.fromAddress).toContain('plans@skyfurrow.test')
    expect(row.toAddresses).toContain('ana@example.test')
    expect(row.toAddresses).toContain('ben@example.test')
    expect(row.toAddresses).toContain('cy@example.test')
    expect(row.messageId).toBe('<m1@skyfurrow.test>')
    expect(row.textBody.trim()).toBe('Hello')
    expect(row.hasAttachments).toBe(true)
    expect(JSON.parse(row.attachmentsJson)).toEqual([{ filename: 'plan.ics', contentType: 'text/calendar', size: expect.any(Number) }])
    expect(row.sizeBytes).toBe(raw.length)
  })
})
