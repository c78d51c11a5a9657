// The in-process job runner of one API test file, and a wait on a state.
import { createStore } from '../../server/db/repositories/index.ts'
import { startJobs, type JobsHandle } from '../../server/jobs/index.ts'
import { createLogger } from '../../server/logger.ts'
import type { TestServer } from './server.ts'

/**
 * Starts a job runner that works on this file's jobs only. The jobs that earlier files'
 * servers queued and did not run (their start-up checks) are set aside first, as a newer
 * job of their field would, so that the runner's idle means this file's jobs are done
 * (files run one at a time). No start-up sweep and no schedule (no nightly refresh or
 * new-day check queues other fields meanwhile). Coarser engine settings keep the tests
 * short; the code path is the production one.
 */
export async function startFileJobs(server: TestServer, jobConcurrency: number): Promise<JobsHandle> {
  await server.database.pool.query("UPDATE jobs SET status = 'superseded', finished_at = UTC_TIMESTAMP(3) WHERE status = 'queued'")
  return startJobs({
    store: createStore(server.database.db),
    config: { ...server.config, forecastStepMin: 15, forecastSampleCount: 16, jobConcurrency },
    logger: createLogger('error'),
    sweep: false,
    schedule: false,
  })
}

/**
 * Waits on a state, not a clock: calls `probe` until it gives a value (not null, undefined
 * or false) and returns it; past `timeoutMs` fails naming `what`, with `detail()` (a
 * server's output, say) when given.
 */
export async function until<T>(
  probe: () => Promise<T | null | undefined | false>,
  what: string,
  timeoutMs = 20_000,
  detail?: () => string,
): Promise<T> {
  const end = Date.now() + timeoutMs
  for (;;) {
    const value = await probe()
    if (value) return value
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}${detail ? `\n${detail()}` : ''}`)
    await new Promise((r) => setTimeout(r, 50))
  }
}
