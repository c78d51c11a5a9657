import type { Auth } from '../auth/lucia.ts'
import type { Config } from '../config.ts'
import { UniqueViolation, type Store } from '../db/repositories/index.ts'
import { conflict } from '../http/errors.ts'
import type { Logger } from '../logger.ts'
import type { Mailer } from '../mail/transport.ts'

/** What every service is built from. */
export interface ServiceContext {
  config: Config
  store: Store
  lucia: Auth
  mailer: Mailer
  logger: Logger
}

/** E-mail addresses of the invented demo scenario; refused at sign-in in production. */
export const DEMO_EMAIL_SUFFIX = '@demo.skyfurrow.test'
export const isDemoEmail = (email: string) => email.toLowerCase().endsWith(DEMO_EMAIL_SUFFIX)

export const RESET_LINK_MINUTES = 60
export const INVITE_LINK_DAYS = 7

export function pageOf<T>(items: T[], total: number, query: { page: number; pageSize: number }) {
  return { items, total, page: query.page, pageSize: query.pageSize }
}

/**
 * Rethrows a transaction's unique-key violation as a 409 naming the form field, anything
 * else as it is. For the race the service's own "is it taken?" check cannot see: two
 * requests creating the same name at once.
 */
export function rethrowUniqueAsConflict(error: unknown, message: string, field: string): never {
  if (error instanceof UniqueViolation) throw conflict(message, { [field]: message })
  throw error
}
