// Tells a lost database connection from other server errors, so that the API answers 503
// with a sentence (and Retry-After) while MariaDB is unreachable, instead of a 500. The
// pool makes new connections once the database is back: no restart is needed.
const unavailableCodes = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_SERVER_SHUTDOWN',
  'ER_CON_COUNT_ERROR',
  'ER_SERVER_GONE_ERROR',
  'ER_SERVER_LOST',
  'ER_CONNECTION_KILLED',
])

/** True when `error` (or one of its causes) says the database cannot be reached. */
export function isDatabaseUnavailable(error: unknown): boolean {
  let e: unknown = error
  for (let depth = 0; e && depth < 5; depth++) {
    const { code, fatal, message } = e as { code?: string; fatal?: boolean; message?: string }
    if (code && unavailableCodes.has(code)) return true
    if (fatal === true && typeof code === 'string') return true
    if (typeof message === 'string' && /Pool is closed|Can't add new command when connection is in closed state|connection is in closed state/i.test(message)) return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

export const DATABASE_DOWN_MESSAGE = 'The database is not reachable at the moment. Nothing was changed; try again in a minute.'
