// Transactions that MariaDB may roll back for a deadlock or a lock-wait timeout (two
// processes enqueueing the same key, two fields stored at once on neighbouring index gaps):
// such a transaction wrote nothing and is safe to run again.
import type { Repositories, Store } from './repositories/index.ts'

function isRetryable(error: unknown): boolean {
  let e: unknown = error
  for (let depth = 0; e && depth < 4; depth++) {
    const code = (e as { code?: string }).code
    if (code === 'ER_LOCK_DEADLOCK' || code === 'ER_LOCK_WAIT_TIMEOUT') return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

/** Runs `work` in a transaction, retrying on deadlock or lock-wait timeout (5 attempts in all by default). */
export async function withDeadlockRetry<T>(
  store: Store,
  work: (repos: Repositories) => Promise<T>,
  { attempts = 5 }: { attempts?: number } = {},
): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await store.transaction(work)
    } catch (error) {
      if (attempt >= attempts || !isRetryable(error)) throw error
      await new Promise((r) => setTimeout(r, 10 * attempt + Math.random() * 40))
    }
  }
}
