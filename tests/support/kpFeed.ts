// The stored space-weather (Kp) feed in API tests: keep what is stored and put it back
// afterwards, read the app's own local fake feed into the store as the feed job does, and
// make the stored feed old, so that each test file sets the feed state it checks and leaves
// the next file the feed it found.
import { eq } from 'drizzle-orm'
import { kpBlocks, spaceWeatherFeed } from '../../server/db/schema-planning.ts'
import { createStore } from '../../server/db/repositories/index.ts'
import { fetchKpFeed, LOCAL_KP_FEED_PATH, parseKpFeed, type ParsedKpBlock } from '../../server/services/spaceWeather.ts'
import { Client, type TestServer } from './server.ts'

type FeedServer = Pick<TestServer, 'app' | 'database'>

/** Sets aside the stored Kp blocks and feed record; the function returned puts them back as they were. */
export async function keepKpFeed(server: FeedServer): Promise<() => Promise<void>> {
  const db = server.database.db
  const blocks = await db.select().from(kpBlocks)
  const [feed] = await db.select().from(spaceWeatherFeed)
  return async () => {
    await db.transaction(async (tx) => {
      await tx.delete(kpBlocks)
      if (blocks.length) await tx.insert(kpBlocks).values(blocks)
      await tx.delete(spaceWeatherFeed)
      if (feed) await tx.insert(spaceWeatherFeed).values(feed)
    })
  }
}

/**
 * Reads the app's local fake feed (GET /api/space-weather/kp-forecast.json) into the store
 * through the feed job's own fetch, so the feed is current; returns its blocks as read.
 */
export async function readLocalFakeFeed(server: FeedServer): Promise<ParsedKpBlock[]> {
  const res = await new Client(server.app).get(LOCAL_KP_FEED_PATH)
  if (res.status !== 200) throw new Error(`the local fake feed answered ${res.status}`)
  const body = JSON.stringify(res.body)
  const result = await fetchKpFeed(createStore(server.database.db), `http://skyfurrow.test${LOCAL_KP_FEED_PATH}`, {
    fetchImpl: async () => new Response(body, { headers: { 'content-type': 'application/json' } }),
  })
  if (!result.ok) throw new Error(`reading the local fake feed failed: ${result.error}`)
  return parseKpFeed(body)
}

/** Makes the stored feed's last good read (and its last attempt) `ageMs` old (whole seconds), with no failure since. */
export async function ageKpFeed(server: FeedServer, ageMs: number): Promise<Date> {
  const at = new Date(Math.floor((Date.now() - ageMs) / 1000) * 1000)
  const [row] = await server.database.db.select().from(spaceWeatherFeed)
  if (!row) throw new Error('no feed record to age: read a feed first')
  await server.database.db.update(spaceWeatherFeed).set({ lastOkAt: at, lastAttemptAt: at, lastError: null }).where(eq(spaceWeatherFeed.id, row.id))
  return at
}
