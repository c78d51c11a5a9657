// Password hashing (argon2id via @node-rs/argon2, whose default algorithm is argon2id) and
// the one-time tokens of reset and invitation links.
import { createHash, randomBytes } from 'node:crypto'
import { hash, verify } from '@node-rs/argon2'

// OWASP's minimum for argon2id: 19 MiB, 2 passes, 1 lane.
const options = { memoryCost: 19_456, timeCost: 2, parallelism: 1, outputLen: 32 }

export function hashPassword(password: string): Promise<string> {
  return hash(password, options)
}

// Verified against when the account does not exist, so that the answer takes as long.
let dummyHash: Promise<string> | undefined

/** True when `password` matches `passwordHash`; spends the same effort when there is no hash. */
export async function verifyPassword(passwordHash: string | null | undefined, password: string): Promise<boolean> {
  if (!passwordHash) {
    dummyHash ??= hashPassword('skyfurrow-placeholder-password')
    await verify(await dummyHash, password).catch(() => false)
    return false
  }
  try {
    return await verify(passwordHash, password)
  } catch {
    return false
  }
}

/** A new random link token (43 URL-safe characters) and the hash that is stored. */
export function newLinkToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, tokenHash: hashLinkToken(token) }
}

export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token).digest('hex')
}
