import { describe, expect, it } from 'vitest'
import { farmInputSchema, userInviteSchema } from '@shared/schemas'
import { issuesToFields } from '@/composables/useFormErrors'
import { linkify, mailSrcdoc } from '@/composables/linkify'

describe('issuesToFields', () => {
  it('gives each form field the first message of the shared schema', () => {
    const result = farmInputSchema.safeParse({ name: '', timeZone: 'Mars/Olympus' })
    expect(result.success).toBe(false)
    if (result.success) return
    const fields = issuesToFields(result.error.issues)
    expect(fields.name).toBe('Enter the farm name')
    expect(fields.timeZone).toBe('Choose an IANA time zone such as America/Chicago')
  })

  it('puts a message without a path on the form as a whole', () => {
    expect(issuesToFields([{ path: [], message: 'Nope' }])).toEqual({ _form: 'Nope' })
  })

  it('reports a bad e-mail on the invite form', () => {
    const result = userInviteSchema.safeParse({ email: 'not-mail', name: 'A', role: 'client' })
    expect(result.success).toBe(false)
    if (!result.success) expect(issuesToFields(result.error.issues)).toEqual({ email: 'Enter a valid e-mail address' })
  })
})

describe('linkify', () => {
  it('turns links in plain-text mail into link parts and keeps the punctuation out', () => {
    const parts = linkify('Set it here: http://127.0.0.1:3000/reset-password?token=abc&invite=1. Thanks')
    expect(parts).toEqual([
      { kind: 'text', text: 'Set it here: ' },
      { kind: 'link', text: 'http://127.0.0.1:3000/reset-password?token=abc&invite=1', href: 'http://127.0.0.1:3000/reset-password?token=abc&invite=1' },
      { kind: 'text', text: '. Thanks' },
    ])
  })

  it('leaves text without links alone', () => {
    expect(linkify('no links')).toEqual([{ kind: 'text', text: 'no links' }])
    expect(linkify('')).toEqual([])
  })
})

describe('mailSrcdoc', () => {
  it('makes links open in a new tab inside the sandbox', () => {
    expect(mailSrcdoc('<html><head><title>x</title></head><body>b</body></html>')).toMatch(/<head><base target="_blank">/)
    expect(mailSrcdoc('<p>b</p>')).toMatch(/^<base target="_blank">.*<p>b<\/p>$/)
  })
})
