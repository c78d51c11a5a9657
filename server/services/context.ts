import type { Auth } from '../auth/lucia.ts'
import type { Config } from '../config.ts'
import type { Store } from '../db/repositories/index.ts'
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
