import { describe, expect, it } from 'vitest'
import { hashLinkToken, hashPassword, newLinkToken, verifyPassword } from '../../../server/auth/password.ts'

describe('passwords', () => {
  it('hashes with argon2id and verifies', async () => {
    const hash = await hashPassword('correct horse battery')
    expect(hash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/)
    expect(await verifyPassword(hash, 'correct horse battery')).toBe(true)
    expect(await verifyPassword(hash, 'correct horse battery!')).toBe(false)
  })

  it('salts every hash', async () => {
    expect(await hashPassword('same password')).not.toBe(await hashPassword('same password'))
  })

  it('answers false for a missing or malformed hash', async () => {
    expect(await verifyPassword(null, 'anything')).toBe(false)
    expect(await verifyPassword('not-a-hash', 'anything')).toBe(false)
  })
})

describe('link tokens', () => {
  it('are long, URL-safe, unique, and stored only as a SHA-256 hash', () => {
    const a = newLinkToken()
    const b = newLinkToken()
    expect(a.token).toMatch(/^[A-Za-z0-9_-]{43}$/)
    expect(a.token).not.toBe(b.token)
    expect(a.tokenHash).toMatch(/^[0-9a-f]{64}$/)
    expect(a.tokenHash).toBe(hashLinkToken(a.token))
    expect(a.tokenHash).not.toContain(a.token)
  })
})
