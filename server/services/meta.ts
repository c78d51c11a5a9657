// Health and public facts about this installation.
import { readFileSync } from 'node:fs'
import type { AppMeta, HealthStatus } from '../../shared/schemas/meta.ts'
import { DEMO_EMAIL_SUFFIX, type ServiceContext } from './context.ts'

const version = (
  JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }
).version

export function createMetaService(ctx: ServiceContext) {
  const { store, config, mailer, logger } = ctx
  return {
    async health(): Promise<HealthStatus> {
      try {
        await Promise.race([
          store.ping(),
          new Promise((_, reject) => setTimeout(() => reject(new Error('database ping timed out')), 3_000).unref()),
        ])
        return { status: 'ok', database: 'ok' }
      } catch (error) {
        logger.warn('health check: the database is unreachable', error instanceof Error ? error.message : error)
        return { status: 'degraded', database: 'down' }
      }
    },

    async meta(): Promise<AppMeta> {
      const demo =
        config.nodeEnv !== 'production' && (await store.repos.users.countByEmailSuffix(DEMO_EMAIL_SUFFIX)) > 0
      const businessName = (await store.repos.business.get())?.name ?? 'Skyfurrow'
      return { fakeMailbox: mailer.fake, version, demo, businessName }
    },
  }
}
export type MetaService = ReturnType<typeof createMetaService>
